import type { NaiveTest } from '../schemas/analysis-result'
import { EngineInputError } from '../stats/engine-input-error'
import { oneWayAnova } from '../stats/one-way-anova'
import type { NestedDesign } from '../stats/types'
import { welchTest } from '../stats/welch-test'

/**
 * The comparison that ignores the nesting, kept to show how wrong it is: Welch's t-test on all
 * observations for two conditions (oriented a − b), a one-way ANOVA on all observations for
 * three or more. Null without a condition or when the test is undefined (no variation).
 *
 * @example
 * naiveComparison(design, { a: 'NW-117', b: 'vehicle' })
 * // → { method: 'welch', a: 'NW-117', b: 'vehicle', estimate: 5.5, t: 12.1, df: 9.7e5, p: 1e-33, … }
 */
export function naiveComparison(
  design: NestedDesign,
  pair: { a: string; b: string } | null,
): NaiveTest | null {
  const condition = design.condition
  if (!condition) return null
  const k = condition.labels.length
  try {
    if (k === 2 && pair) {
      const summaries = conditionSummaries(design.y, condition.codes, k)
      const [a, b] = [pair.a, pair.b].map((label) => summaries[condition.labels.indexOf(label)])
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
    const groups: number[][] = condition.labels.map(() => [])
    for (let i = 0; i < design.nObs; i++) groups[condition.codes[i]].push(design.y[i])
    const anova = oneWayAnova(groups)
    return { method: 'one-way-anova', f: anova.f, df1: anova.dfBetween, df2: anova.dfWithin, p: anova.p }
  } catch (error) {
    if (error instanceof EngineInputError) return null
    throw error
  }
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
