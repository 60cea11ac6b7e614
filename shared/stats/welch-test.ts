import { EngineInputError } from './engine-input-error'
import { studentTTwoSidedP } from './reml/student-t-two-sided-p'

export interface GroupSummary {
  /** Number of observations. */
  n: number
  mean: number
  /** Sample variance (divisor n − 1). */
  variance: number
}

export interface WelchTestResult {
  t: number
  /** Welch–Satterthwaite degrees of freedom. */
  df: number
  /** Two-sided p-value. */
  p: number
  /** mean(a) − mean(b). */
  diff: number
  /** Standard error of the difference, √(s_a²/n_a + s_b²/n_b). */
  se: number
}

/**
 * Welch's two-sample t-test from group summaries, treating every observation as independent.
 * Nestwise shows it only as the naive (wrong) answer for nested data: it ignores clustering, so
 * its standard error is too small and its p-value too optimistic.
 *
 * Formulas (Welch 1947, Biometrika 34:28):
 *   se = √(s_a²/n_a + s_b²/n_b), t = (ȳ_a − ȳ_b) / se,
 *   df = se⁴ / [ (s_a²/n_a)² / (n_a − 1) + (s_b²/n_b)² / (n_b − 1) ], p = 2 · P(T_df > |t|).
 *
 * Guard errors: a group with fewer than two observations, a non-finite mean, a negative or
 * non-finite variance, both variances zero.
 *
 * @example
 * welchTest({ n: 10, mean: 0.75, variance: 3.200556 }, { n: 10, mean: 2.33, variance: 4.009 })
 * // → { t: -1.8608, df: 17.776, p: 0.07939, diff: -1.58, se: 0.8491 }   (R's sleep data)
 */
export function welchTest(a: GroupSummary, b: GroupSummary): WelchTestResult {
  checkSummary(a, 'first')
  checkSummary(b, 'second')
  const va = a.variance / a.n
  const vb = b.variance / b.n
  if (va + vb === 0) {
    throw new EngineInputError('welchTest: both groups have zero variance, so the t statistic is undefined')
  }
  const se = Math.sqrt(va + vb)
  const diff = a.mean - b.mean
  const t = diff / se
  const df = (va + vb) ** 2 / (va ** 2 / (a.n - 1) + vb ** 2 / (b.n - 1))
  const p = studentTTwoSidedP(t, df)
  return { t, df, p, diff, se }
}

function checkSummary(group: GroupSummary, which: string): void {
  if (!group || typeof group.n !== 'number' || !Number.isInteger(group.n) || group.n < 2) {
    throw new EngineInputError(`welchTest requires at least two observations in the ${which} group`)
  }
  if (typeof group.mean !== 'number' || !Number.isFinite(group.mean)) {
    throw new EngineInputError(`welchTest: the mean of the ${which} group is not a finite number`)
  }
  if (typeof group.variance !== 'number' || !Number.isFinite(group.variance) || group.variance < 0) {
    throw new EngineInputError(`welchTest: the variance of the ${which} group must be a non-negative number`)
  }
}
