import { EngineInputError } from './engine-input-error'
import { oneWayAnova } from './one-way-anova'
import { studentTTwoSidedP } from './reml/student-t-two-sided-p'

export interface UnitMeansTestResult {
  /** 'student-t' for two conditions, 'one-way-anova' for three or more. */
  method: 'student-t' | 'one-way-anova'
  /** F statistic; for two conditions F = t². */
  f: number
  df1: number
  df2: number
  /** Two-sided p-value (for two conditions the t-test and the F-test p-values are the same). */
  p: number
  /** Pooled-variance t statistic; two conditions only. */
  t?: number
  /** Degrees of freedom of t (n_a + n_b − 2); two conditions only. */
  df?: number
  /** mean(first) − mean(second) of the unit means; two conditions only. */
  diff?: number
  /** Pooled standard error of `diff`; two conditions only. */
  se?: number
}

/**
 * "Summarise first" comparison: average each outermost unit that carries a single condition,
 * then compare the unit means between conditions, so each unit counts once (Lord et al. 2020,
 * J Cell Biol 219:e202001064). Two conditions: Student's pooled-variance t-test; three or more:
 * one-way analysis of variance on the unit means.
 *
 * Formulas: s_p² = [(n_a − 1)s_a² + (n_b − 1)s_b²] / (n_a + n_b − 2),
 *   se = s_p √(1/n_a + 1/n_b), t = (ȳ_a − ȳ_b) / se, df = n_a + n_b − 2;
 *   ANOVA F = MSB / MSW with (k − 1, N − k) df (Fisher; any textbook).
 *
 * Guard errors: fewer than two conditions, a condition without unit means, no residual degrees
 * of freedom (every condition has one unit), non-finite values, no variation within conditions.
 *
 * @example
 * unitMeansTest([[0.7, -1.6, -0.2, -1.2, -0.1, 3.4, 3.7, 0.8, 0.0, 2.0],
 *                [1.9, 0.8, 1.1, 0.1, -0.1, 4.4, 5.5, 1.6, 4.6, 3.4]])
 * // → { method: 'student-t', t: -1.8608, df: 18, p: 0.07919, diff: -1.58, se: 0.8491, f: 3.4626, … }
 */
export function unitMeansTest(groups: number[][]): UnitMeansTestResult {
  if (!Array.isArray(groups) || groups.length < 2) {
    throw new EngineInputError('unitMeansTest requires unit means from at least two conditions')
  }
  groups.forEach((group, index) => {
    if (!Array.isArray(group) || group.length === 0) {
      throw new EngineInputError(`unitMeansTest: condition ${index + 1} has no unit means`)
    }
  })
  const totalUnits = groups.reduce((sum, group) => sum + group.length, 0)
  if (totalUnits - groups.length < 1) {
    throw new EngineInputError(
      'unitMeansTest requires at least one condition with two or more units; with one unit per condition there is no unit-to-unit variation to test against',
    )
  }
  const anova = anovaOrExplain(groups)
  if (anova.msw === 0) {
    throw new EngineInputError(
      'unitMeansTest: the unit means do not vary within any condition, so the test is undefined',
    )
  }
  if (groups.length > 2) {
    return { method: 'one-way-anova', f: anova.f, df1: anova.dfBetween, df2: anova.dfWithin, p: anova.p }
  }
  const [a, b] = groups
  const meanA = mean(a)
  const meanB = mean(b)
  const diff = meanA - meanB
  const se = Math.sqrt(anova.msw * (1 / a.length + 1 / b.length))
  const t = diff / se
  const df = anova.dfWithin
  const p = studentTTwoSidedP(t, df)
  return { method: 'student-t', t, df, p, diff, se, f: t * t, df1: 1, df2: df }
}

function anovaOrExplain(groups: number[][]) {
  try {
    return oneWayAnova(groups)
  } catch (error) {
    if (error instanceof EngineInputError) {
      throw new EngineInputError(
        error.message.replace(/^oneWayAnova/, 'unitMeansTest').replace(/group/g, 'condition'),
      )
    }
    throw error
  }
}

function mean(values: number[]): number {
  let sum = 0
  for (const v of values) sum += v
  return sum / values.length
}
