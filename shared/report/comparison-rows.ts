import {
  isWald,
  isWaldTerm,
  type AnalysisResult,
  type MixedModelContrast,
  type TermTest,
  type WaldContrast,
  type WaldTermTest,
} from '../schemas/analysis-result'
import { contrastInterval } from './contrast-interval'
import { glmmFamily, measureName, ratioAbbreviation, type GlmmFamily } from './family-words'
import { formatDf, formatInterval, formatNumber, formatP } from './number-format'
import { termLabel } from './words'

export interface ComparisonRow {
  id: string
  method: string
  /** What is compared: "NW-117 − vehicle", "all conditions equal" or a model term. */
  what: string
  estimate: string
  interval: string
  statistic: string
  df: string
  p: string
  /** This comparison's own design effect and effective n (engine ≥ 0.2, model contrasts only). */
  designEffect: string
  effectiveN: string
  /** Why the row must not be used; set for the naive test only. */
  wrongBecause?: string
  /** The reason is shown under this row: the last row of the naive block. */
  reasonBelow?: boolean
  note?: string
  /** One line saying what the method weights, so that estimates that differ can be told apart. */
  weights?: string
}

/**
 * What each method weights. The three estimates differ when units hold different numbers of
 * observations: the model sits between the other two, as its variance components say.
 */
export const METHOD_WEIGHTS = {
  mixedModel:
    'Weights each unit by the information it carries: between equal weights (when units differ much) and weights by observation count (when they differ little).',
  unitMeans: 'Weights every unit equally, whatever its number of observations.',
  bootstrap:
    'Weights every observation equally (the cell-weighted difference), so units with more observations pull harder; the interval resamples units, then observations.',
  naive: 'Weights every observation equally and treats them all as independent.',
} as const

const NONE = { estimate: '—', interval: '—', designEffect: '—', effectiveN: '—' }

function contrastRow(c: MixedModelContrast, adjusted: boolean): ComparisonRow {
  const [low, high] = c.ci ?? contrastInterval(c.estimate, c.se, c.df)
  return {
    id: `model-${c.a}-${c.b}`,
    method: 'Mixed model (REML, Satterthwaite df)',
    what: `${c.a} − ${c.b}`,
    estimate: formatNumber(c.estimate),
    interval: formatInterval(low, high),
    statistic: `t = ${formatNumber(c.t)}`,
    df: formatDf(c.df),
    p: adjusted ? `${formatP(c.pHolm)} (Holm)` : formatP(c.p),
    designEffect: c.designEffect === undefined ? '—' : formatNumber(c.designEffect),
    effectiveN: c.effectiveN === undefined ? '—' : formatNumber(c.effectiveN),
    weights: METHOD_WEIGHTS.mixedModel,
  }
}

/**
 * A contrast of a binary or count model: the odds or rate ratio of a against b with its Wald
 * interval, z, and the Holm-adjusted p when there are several pairs.
 */
function waldContrastRow(c: WaldContrast, family: GlmmFamily, adjusted: boolean): ComparisonRow {
  return {
    id: `model-${c.a}-${c.b}`,
    method: 'Mixed model (Laplace, Wald z)',
    what: `${c.a} vs ${c.b}`,
    estimate: `${ratioAbbreviation(family)} ${formatNumber(c.ratio)}`,
    interval: formatInterval(c.ratioLow, c.ratioHigh),
    statistic: `z = ${formatNumber(c.z)}`,
    df: '—',
    p: adjusted ? `${formatP(c.pHolm)} (Holm)` : formatP(c.p),
    designEffect: formatNumber(c.designEffect),
    effectiveN: formatNumber(c.effectiveN),
  }
}

/** One row per term of an F-test or Wald χ²-test table ("genotype", "genotype × treatment"). */
function termTestRows(
  id: string,
  method: string,
  terms: readonly (TermTest | WaldTermTest)[],
): ComparisonRow[] {
  return terms.map((t) => ({
    ...NONE,
    id: `${id}-${t.term}`,
    method,
    what: termLabel(t.term),
    statistic: isWaldTerm(t) ? `χ² = ${formatNumber(t.chisq)}` : `F = ${formatNumber(t.f)}`,
    df: isWaldTerm(t) ? formatDf(t.df) : `${formatDf(t.df1)}, ${formatDf(t.df2)}`,
    p: formatP(t.p),
  }))
}

function unitMeansRows(result: AnalysisResult): ComparisonRow[] {
  const unitMeans = result.comparisons.unitMeans
  if (!unitMeans) return []
  const id = 'unit-means'
  const family = glmmFamily(result)
  const of = family ? `unit ${measureName(family)}s` : 'unit means'
  const method = `Test on ${of} (${unitMeans.nUnits} units of “${unitMeans.level}”)`
  if (unitMeans.method === 'two-way-anova')
    return termTestRows(id, method.replace('Test on', 'Two-way ANOVA on'), unitMeans.terms).map((row, i) =>
      i === 0 ? { ...row, weights: METHOD_WEIGHTS.unitMeans } : row,
    )
  if (unitMeans.method === 'student-t') {
    const [low, high] = contrastInterval(unitMeans.estimate, unitMeans.se, unitMeans.df)
    return [
      {
        ...NONE,
        id,
        method,
        what: `${unitMeans.a} − ${unitMeans.b}`,
        estimate: formatNumber(unitMeans.estimate),
        interval: formatInterval(low, high),
        statistic: `t = ${formatNumber(unitMeans.t)}`,
        df: formatDf(unitMeans.df),
        p: formatP(unitMeans.p),
        weights: METHOD_WEIGHTS.unitMeans,
      },
    ]
  }
  return [
    {
      ...NONE,
      id,
      method,
      what: 'all conditions equal',
      statistic: `F = ${formatNumber(unitMeans.f)}`,
      df: `${formatDf(unitMeans.df1)}, ${formatDf(unitMeans.df2)}`,
      p: formatP(unitMeans.p),
      weights: METHOD_WEIGHTS.unitMeans,
    },
  ]
}

function naiveRows(result: AnalysisResult): ComparisonRow[] {
  const naive = result.comparisons.naive
  if (!naive) return []
  const designEffect = result.headline?.designEffect ?? result.designEffect
  const wrongBecause = `Counts all ${result.nObs} observations as independent, but observations from one unit are alike (design effect ${formatNumber(designEffect)}), so its p-value is far too small.`
  if (naive.method === 'linear-model' || naive.method === 'glm') {
    const method =
      naive.method === 'glm'
        ? 'Naive GLM without units (every observation independent)'
        : 'Naive linear model (every observation independent)'
    const rows = termTestRows('naive', method, naive.terms)
    // One reason under the whole block: the last row carries it.
    return rows.map((row, i) => ({
      ...row,
      wrongBecause,
      reasonBelow: i === rows.length - 1,
      ...(i === 0 ? { weights: METHOD_WEIGHTS.naive } : {}),
    }))
  }
  if (naive.method === 'chi-square') {
    return [
      {
        ...NONE,
        id: 'naive',
        method: 'Naive χ² test of the pooled counts (every observation independent)',
        what: 'all conditions equal',
        statistic: `χ² = ${formatNumber(naive.chisq)}`,
        df: formatDf(naive.df),
        p: formatP(naive.p),
        wrongBecause,
        reasonBelow: true,
      },
    ]
  }
  if (naive.method === 'welch') {
    const [low, high] = contrastInterval(naive.estimate, naive.se, naive.df)
    return [
      {
        ...NONE,
        id: 'naive',
        method: 'Naive t-test (every observation independent)',
        what: `${naive.a} − ${naive.b}`,
        estimate: formatNumber(naive.estimate),
        interval: formatInterval(low, high),
        statistic: `t = ${formatNumber(naive.t)}`,
        df: formatDf(naive.df),
        p: formatP(naive.p),
        wrongBecause,
        reasonBelow: true,
        weights: METHOD_WEIGHTS.naive,
      },
    ]
  }
  return [
    {
      ...NONE,
      id: 'naive',
      method: 'Naive ANOVA (every observation independent)',
      what: 'all conditions equal',
      statistic: `F = ${formatNumber(naive.f)}`,
      df: `${formatDf(naive.df1)}, ${formatDf(naive.df2)}`,
      p: formatP(naive.p),
      wrongBecause,
      reasonBelow: true,
      weights: METHOD_WEIGHTS.naive,
    },
  ]
}

/**
 * Rows of the comparison table, best answer first: the mixed model (omnibus F with 3+ conditions,
 * then each pair, Holm-adjusted when there are several), the test on unit means, the bootstrap,
 * and last the naive test, struck through with its reason.
 */
export function comparisonRows(result: AnalysisResult): ComparisonRow[] {
  const rows: ComparisonRow[] = []
  const { mixedModel, bootstrap } = result.comparisons
  const contrasts = mixedModel?.contrasts ?? []
  if (mixedModel?.omnibus) {
    const f = mixedModel.omnibus
    rows.push({
      ...NONE,
      id: 'model-omnibus',
      method: 'Mixed model, F test',
      what: 'all conditions equal',
      statistic: `F = ${formatNumber(f.f)}`,
      df: `${formatDf(f.df1)}, ${formatDf(f.df2)}`,
      p: formatP(f.p),
      weights: METHOD_WEIGHTS.mixedModel,
    })
  }
  const family = glmmFamily(result) ?? 'binomial'
  // The weights line once per method: on the first row of the model's block.
  contrasts.forEach((c, i) => {
    const row = isWald(c)
      ? waldContrastRow(c, family, contrasts.length > 1)
      : contrastRow(c, result.groups.length > 2)
    rows.push(i === 0 && !mixedModel?.omnibus ? row : { ...row, weights: undefined })
  })
  rows.push(...unitMeansRows(result))
  for (const [i, c] of (bootstrap?.contrasts ?? []).entries()) {
    rows.push({
      ...NONE,
      id: `bootstrap-${c.a}-${c.b}`,
      method: `Hierarchical bootstrap (${bootstrap!.resamples} resamples)`,
      what: `${c.a} − ${c.b}`,
      estimate: formatNumber(c.estimate),
      interval: formatInterval(c.ciLow, c.ciHigh),
      statistic: '—',
      df: '—',
      p: formatP(c.p),
      note: 'Percentile interval; its p is a resampling summary, not an exact test.',
      ...(i === 0 ? { weights: METHOD_WEIGHTS.bootstrap } : {}),
    })
  }
  rows.push(...naiveRows(result))
  return rows
}

/** Whether the table needs the per-comparison design effect and effective n columns. */
export function hasPerComparisonDesignEffect(rows: readonly ComparisonRow[]): boolean {
  return rows.some((r) => r.designEffect !== '—' || r.effectiveN !== '—')
}
