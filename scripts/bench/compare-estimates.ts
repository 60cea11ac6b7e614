import { isWald, type AnalysisResult } from '../../shared/schemas/analysis-result'

/** What the R benchmark script prints (see lmer-bench.R). */
export interface ReferenceEstimates {
  components: Record<string, number>
  contrasts: { a: string; b: string; estimate: number; se: number; df?: number }[]
  means: { condition: string; estimate: number; se: number; df?: number }[]
}

export interface EstimateRow {
  quantity: string
  ours: number
  reference: number | null
  /**
   * |ours − reference| / |reference| (for a variance component: / the reference's total variance,
   * so a component at the boundary, 0 against 1e-10, is not a 100 % difference); null when the
   * reference lacks the quantity.
   */
  relativeDifference: number | null
}

/**
 * Lines up the analyzer's estimates with a reference fit: variance components (R names nested
 * levels by their path, "lab:animal"; a level × condition term has the same name in both), each
 * condition contrast (estimate, SE, df) and each condition mean (estimate, SE, df). Quantities
 * the reference does not report get null.
 */
export function compareEstimates(result: AnalysisResult, reference: ReferenceEstimates): EstimateRow[] {
  const rows: EstimateRow[] = []
  const add = (quantity: string, ours: number, theirs: number | undefined, scale?: number) => {
    const ref = theirs === undefined ? null : theirs
    rows.push({
      quantity,
      ours,
      reference: ref,
      relativeDifference: ref === null ? null : Math.abs(ours - ref) / (scale ?? Math.abs(ref)),
    })
  }
  const total = Object.values(reference.components).reduce((s, v) => s + v, 0)
  const givenNames = result.levels.map((l) => l.name)
  for (const component of result.varianceComponents) {
    const depth = givenNames.indexOf(component.level)
    const key = depth >= 0 ? givenNames.slice(0, depth + 1).join(':') : component.level
    add(`variance ${component.level}`, component.variance, reference.components[key], total)
  }
  for (const contrast of result.comparisons.mixedModel?.contrasts ?? []) {
    const theirs = reference.contrasts.find((c) => c.a === contrast.a && c.b === contrast.b)
    add(`contrast ${contrast.a} − ${contrast.b}`, contrast.estimate, theirs?.estimate)
    add(`  SE`, contrast.se, theirs?.se)
    if (!isWald(contrast)) add(`  Satterthwaite df`, contrast.df, theirs?.df)
  }
  for (const group of result.groups) {
    const theirs = reference.means.find((m) => m.condition === group.condition)
    add(`mean ${group.condition}`, group.clustered.estimate, theirs?.estimate)
    add(`  SE`, group.clustered.se, theirs?.se)
    if (group.clustered.df !== null) add(`  Satterthwaite df`, group.clustered.df, theirs?.df)
  }
  return rows
}

/**
 * Largest relative difference over the rows that have a reference value: of the Satterthwaite df
 * when `which` is 'df', of every other quantity (variances, estimates, SEs) when it is 'estimates'.
 */
export function largestDifference(
  rows: EstimateRow[],
  which: 'df' | 'estimates' | 'all' = 'all',
): { quantity: string; value: number } | null {
  let worst: { quantity: string; value: number } | null = null
  let lastName = ''
  for (const row of rows) {
    const name = row.quantity.startsWith('  ') ? `${lastName.trim()} ${row.quantity.trim()}` : row.quantity
    if (!row.quantity.startsWith('  ')) lastName = row.quantity
    const isDf = name.endsWith('Satterthwaite df')
    if (which !== 'all' && isDf !== (which === 'df')) continue
    if (row.relativeDifference !== null && (!worst || row.relativeDifference > worst.value))
      worst = { quantity: name, value: row.relativeDifference }
  }
  return worst
}
