import type { NaiveTest } from '../schemas/analysis-result'
import { EngineInputError } from './engine-input-error'
import { oneWayAnova } from './one-way-anova'
import type { NestedDesign } from './types'
import { welchTest } from './welch-test'

/**
 * The comparison that ignores the nesting, kept to show how wrong it is: Welch's t-test on all
 * observations for two conditions (oriented a − b), a one-way ANOVA on all observations for
 * three or more. Null without a condition or when the test is undefined (no variation).
 *
 * @example
 * naiveComparison(design, { a: 'NW-117', b: 'vehicle' })
 * // → { method: 'welch', a: 'NW-117', b: 'vehicle', estimate: 5.5, t: 12.1, df: 9.7e5, p: 1e-33, … }
 */
export function naiveComparison(design: NestedDesign, pair: { a: string; b: string } | null): NaiveTest | null {
  const condition = design.condition
  if (!condition) return null
  const k = condition.labels.length
  try {
    if (k === 2 && pair) {
      const [a, b] = [pair.a, pair.b].map((label) => summary(design.y, condition.codes, condition.labels.indexOf(label)))
      const test = welchTest(a, b)
      return { method: 'welch', a: pair.a, b: pair.b, estimate: test.diff, se: test.se, t: test.t, df: test.df, p: test.p }
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

/** n, mean and sample variance of one condition's observations (two passes, for accuracy). */
function summary(y: Float64Array, codes: Int32Array, code: number) {
  let n = 0
  let sum = 0
  for (let i = 0; i < y.length; i++) {
    if (codes[i] === code) {
      n++
      sum += y[i]
    }
  }
  const mean = sum / n
  let squares = 0
  for (let i = 0; i < y.length; i++) if (codes[i] === code) squares += (y[i] - mean) ** 2
  return { n, mean, variance: squares / (n - 1) }
}
