import jStat from 'jstat'

/**
 * Two-sided p-value of a t statistic, P(|T_df| ≥ |t|), computed as the regularised incomplete
 * beta I_{df/(df+t²)}(df/2, 1/2) so that small p-values keep their relative precision (1 − cdf
 * would cancel). Accepts non-integer df (Satterthwaite).
 *
 * Source: Abramowitz & Stegun (1964), 26.7.1 and 26.5.27.
 *
 * Guard errors: none; df ≤ 0 or a non-finite input gives NaN.
 *
 * @example
 * studentTTwoSidedP(2.1, 7.3) // → 0.072247 (R: 2 * pt(-2.1, 7.3))
 */
export function studentTTwoSidedP(t: number, df: number): number {
  if (!(df > 0) || Number.isNaN(t)) return NaN
  if (!Number.isFinite(t)) return 0
  if (!Number.isFinite(df)) return 2 * jStat.normal.cdf(-Math.abs(t), 0, 1)
  return Math.min(1, jStat.ibeta(df / (df + t * t), df / 2, 0.5))
}
