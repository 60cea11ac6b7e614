import type { AnalysisResult } from '../../../shared/schemas/analysis-result'
import { contrastInterval } from '../../../shared/report/contrast-interval'
import { formatDf, formatInterval, formatNumber, formatP } from '../../../shared/report/number-format'

export interface ComparisonRow {
  id: string
  method: string
  /** What is compared: "NW-117 − vehicle" or "all conditions". */
  what: string
  estimate: string
  interval: string
  statistic: string
  df: string
  p: string
  /** Why the row must not be used; set for the naive test only. */
  wrongBecause?: string
  note?: string
}

/**
 * Rows of the comparison table, best answer first: the mixed model (omnibus F with 3+ conditions,
 * then each pair, Holm-adjusted), the test on unit means, the bootstrap, and last the naive test.
 */
export function comparisonRows(result: AnalysisResult): ComparisonRow[] {
  const rows: ComparisonRow[] = []
  const { mixedModel, unitMeans, naive, bootstrap } = result.comparisons
  const many = result.groups.length > 2
  if (mixedModel?.omnibus) {
    const f = mixedModel.omnibus
    rows.push({
      id: 'model-omnibus',
      method: 'Mixed model, F test',
      what: 'all conditions equal',
      estimate: '—',
      interval: '—',
      statistic: `F = ${formatNumber(f.f)}`,
      df: `${formatDf(f.df1)}, ${formatDf(f.df2)}`,
      p: formatP(f.p),
    })
  }
  for (const c of mixedModel?.contrasts ?? []) {
    const [low, high] = contrastInterval(c.estimate, c.se, c.df)
    rows.push({
      id: `model-${c.a}-${c.b}`,
      method: 'Mixed model (REML, Satterthwaite df)',
      what: `${c.a} − ${c.b}`,
      estimate: formatNumber(c.estimate),
      interval: formatInterval(low, high),
      statistic: `t = ${formatNumber(c.t)}`,
      df: formatDf(c.df),
      p: many ? `${formatP(c.pHolm)} (Holm)` : formatP(c.p),
    })
  }
  if (unitMeans) {
    const base = {
      id: 'unit-means',
      method: `Test on unit means (${unitMeans.nUnits} units of “${unitMeans.level}”)`,
    }
    if (unitMeans.method === 'student-t') {
      const [low, high] = contrastInterval(unitMeans.estimate, unitMeans.se, unitMeans.df)
      rows.push({
        ...base,
        what: `${unitMeans.a} − ${unitMeans.b}`,
        estimate: formatNumber(unitMeans.estimate),
        interval: formatInterval(low, high),
        statistic: `t = ${formatNumber(unitMeans.t)}`,
        df: formatDf(unitMeans.df),
        p: formatP(unitMeans.p),
      })
    } else {
      rows.push({
        ...base,
        what: 'all conditions equal',
        estimate: '—',
        interval: '—',
        statistic: `F = ${formatNumber(unitMeans.f)}`,
        df: `${formatDf(unitMeans.df1)}, ${formatDf(unitMeans.df2)}`,
        p: formatP(unitMeans.p),
      })
    }
  }
  for (const c of bootstrap?.contrasts ?? []) {
    rows.push({
      id: `bootstrap-${c.a}-${c.b}`,
      method: `Hierarchical bootstrap (${bootstrap!.resamples} resamples)`,
      what: `${c.a} − ${c.b}`,
      estimate: formatNumber(c.estimate),
      interval: formatInterval(c.ciLow, c.ciHigh),
      statistic: '—',
      df: '—',
      p: formatP(c.p),
      note: 'Percentile interval; its p is a resampling summary, not an exact test.',
    })
  }
  if (naive) {
    const wrongBecause = `Counts all ${result.nObs} observations as independent, but observations from one unit are alike (design effect ${formatNumber(result.designEffect)}), so its p-value is far too small.`
    if (naive.method === 'welch') {
      const [low, high] = contrastInterval(naive.estimate, naive.se, naive.df)
      rows.push({
        id: 'naive',
        method: 'Naive t-test (every observation independent)',
        what: `${naive.a} − ${naive.b}`,
        estimate: formatNumber(naive.estimate),
        interval: formatInterval(low, high),
        statistic: `t = ${formatNumber(naive.t)}`,
        df: formatDf(naive.df),
        p: formatP(naive.p),
        wrongBecause,
      })
    } else {
      rows.push({
        id: 'naive',
        method: 'Naive ANOVA (every observation independent)',
        what: 'all conditions equal',
        estimate: '—',
        interval: '—',
        statistic: `F = ${formatNumber(naive.f)}`,
        df: `${formatDf(naive.df1)}, ${formatDf(naive.df2)}`,
        p: formatP(naive.p),
        wrongBecause,
      })
    }
  }
  return rows
}
