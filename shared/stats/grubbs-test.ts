import { EngineInputError } from './engine-input-error'
import { precisionFlag, type PrecisionFlag } from './precision-flag'
import { studentTQuantile } from './student-t-quantile'

export interface GrubbsSide {
  /** Index (input order) of the largest or smallest value. */
  index: number
  value: number
  /** G_p = (x_max − x̄)/s or G_1 = (x̄ − x_min)/s. */
  g: number
  flag: PrecisionFlag
}

export interface GrubbsTestResult {
  n: number
  mean: number
  /** SD of the values (divisor n − 1). */
  sd: number
  high: GrubbsSide
  low: GrubbsSide
  /** Critical values for one largest or one smallest value. */
  critical: { fivePercent: number; onePercent: number }
}

/**
 * Grubbs' test for one outlying value (the largest or the smallest), as applied to laboratory
 * means in ISO 5725-2:1994 §7.3.4 (Grubbs 1969, Technometrics 11:1). Straggler above the 5%
 * critical value, outlier above the 1% value.
 *
 * Formulas: G_p = (x_max − x̄)/s, G_1 = (x̄ − x_min)/s, s the SD with divisor n − 1.
 *   Critical value: G_crit = ((n − 1)/√n) · √(t² / (n − 2 + t²)), t = t_{1−α/(2n), n−2}.
 *   The α/(2n) split reproduces ISO 5725-2 Table 5 (e.g. n = 10: 2.290 at 5%, 2.482 at 1%).
 *
 * Not included: the double Grubbs test (two largest or two smallest together). Its critical
 * values have no closed form (ISO tabulates them; Wilrich 2013 gives an approximation) and we
 * do not want to ship a hand-tuned approximation; apply the single test again after removing
 * an outlier if needed.
 *
 * Guard errors: fewer than three values, a non-finite value, all values equal.
 *
 * @example
 * grubbsTest([10.1, 10.3, 9.9, 10.0, 10.2, 12.5])
 * // → { high: { index: 5, g: 2.020, flag: 'outlier' }, critical: { fivePercent: 1.887, onePercent: 1.973 }, … }
 */
export function grubbsTest(values: number[]): GrubbsTestResult {
  if (!Array.isArray(values) || values.length < 3) {
    throw new EngineInputError(
      `grubbsTest requires at least three values, got ${Array.isArray(values) ? values.length : 0}`,
    )
  }
  values.forEach((v, i) => {
    if (typeof v !== 'number' || !Number.isFinite(v)) {
      throw new EngineInputError(`grubbsTest: value ${i + 1} is not a finite number`)
    }
  })
  const n = values.length
  const mean = values.reduce((a, b) => a + b, 0) / n
  const sd = Math.sqrt(values.reduce((sum, v) => sum + (v - mean) ** 2, 0) / (n - 1))
  if (sd === 0) throw new EngineInputError('grubbsTest: all values are equal, so G is undefined')
  let hi = 0
  let lo = 0
  values.forEach((v, i) => {
    if (v > values[hi]) hi = i
    if (v < values[lo]) lo = i
  })
  const critical = { fivePercent: grubbsCritical(n, 0.05), onePercent: grubbsCritical(n, 0.01) }
  const side = (index: number, g: number): GrubbsSide => ({
    index,
    value: values[index],
    g,
    flag: precisionFlag(g, critical.fivePercent, critical.onePercent),
  })
  return {
    n,
    mean,
    sd,
    high: side(hi, (values[hi] - mean) / sd),
    low: side(lo, (mean - values[lo]) / sd),
    critical,
  }
}

function grubbsCritical(n: number, alpha: number): number {
  const t = studentTQuantile(1 - alpha / (2 * n), n - 2)
  return ((n - 1) / Math.sqrt(n)) * Math.sqrt((t * t) / (n - 2 + t * t))
}
