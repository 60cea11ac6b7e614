import type { NaiveTest } from '../schemas/analysis-result'
import { EngineInputError } from '../stats/engine-input-error'
import { leastSquaresTermTests } from '../stats/least-squares-term-tests'
import { oneWayAnova } from '../stats/one-way-anova'
import { evaluateNestedReml } from '../stats/reml/evaluate-nested-reml'
import { nestedSufficientStats } from '../stats/reml/sufficient-stats'
import type { NestedDesign } from '../stats/types'
import { welchTest } from '../stats/welch-test'

/**
 * The comparison that ignores the nesting, kept to show how wrong it is: Welch's t-test on all
 * observations for two conditions (oriented a − b), a one-way ANOVA on all observations for
 * three or more; with two factors or covariates, the model's fixed terms fitted by least squares
 * on all observations, each term tested with the same hypotheses as the mixed model. Null
 * without fixed terms or when the test is undefined (no variation).
 *
 * @example
 * naiveComparison(design, { a: 'NW-117', b: 'vehicle' }, hypotheses)
 * // → { method: 'welch', a: 'NW-117', b: 'vehicle', estimate: 5.5, t: 12.1, df: 9.7e5, p: 1e-33, … }
 */
export function naiveComparison(
  design: NestedDesign,
  pair: { a: string; b: string } | null,
  hypotheses: { term: string; rows: number[][] }[],
): NaiveTest | null {
  if (design.fixed.terms.length === 0) return null
  try {
    if (design.factors.length === 1 && design.covariates.length === 0) return oneFactor(design, pair)
    const stats = nestedSufficientStats(design)
    const ols = evaluateNestedReml(stats, new Array(stats.nTheta).fill(0), true)
    const terms = leastSquaresTermTests(
      { beta: ols.beta!, xtxInverse: ols.xtHxInverse!, rss: ols.r2, dfResidual: design.nObs - stats.p },
      hypotheses,
    )
    return terms.length > 0 ? { method: 'linear-model', terms } : null
  } catch (error) {
    if (error instanceof EngineInputError) return null
    throw error
  }
}

function oneFactor(design: NestedDesign, pair: { a: string; b: string } | null): NaiveTest {
  const { labels, codes } = design.factors[0]
  const k = labels.length
  if (k === 2 && pair) {
    const summaries = conditionSummaries(design.y, codes, k)
    const [a, b] = [pair.a, pair.b].map((label) => summaries[labels.indexOf(label)])
    const test = welchTest(a, b)
    return {
      method: 'welch',
      a: pair.a,
      b: pair.b,
      estimate: test.diff,
      se: test.se,
      t: test.t,
      df: test.df,
      p: test.p,
    }
  }
  const groups: number[][] = labels.map(() => [])
  for (let i = 0; i < design.nObs; i++) groups[codes[i]].push(design.y[i])
  const anova = oneWayAnova(groups)
  return { method: 'one-way-anova', f: anova.f, df1: anova.dfBetween, df2: anova.dfWithin, p: anova.p }
}

/** n, mean and sample variance of each condition's observations (two passes, for accuracy). */
function conditionSummaries(y: Float64Array, codes: Int32Array, k: number) {
  const n = new Float64Array(k)
  const sum = new Float64Array(k)
  for (let i = 0; i < y.length; i++) {
    n[codes[i]]++
    sum[codes[i]] += y[i]
  }
  const mean = Array.from(sum, (s, c) => s / n[c])
  const squares = new Float64Array(k)
  for (let i = 0; i < y.length; i++) squares[codes[i]] += (y[i] - mean[codes[i]]) ** 2
  return mean.map((m, c) => ({ n: n[c], mean: m, variance: squares[c] / (n[c] - 1) }))
}
