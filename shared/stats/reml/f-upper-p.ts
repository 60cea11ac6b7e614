import jStat from 'jstat'

/**
 * Upper-tail p-value of an F statistic, P(F_{df1, df2} ≥ f), as the regularised incomplete beta
 * I_{df2/(df2 + df1 f)}(df2/2, df1/2), which keeps small p-values precise. Non-integer df allowed.
 *
 * Source: Abramowitz & Stegun (1964), 26.6.2.
 *
 * Guard errors: none; non-positive df gives NaN.
 *
 * @example
 * fUpperP(4.2, 2, 13.7) // → 0.037796 (R: pf(4.2, 2, 13.7, lower.tail = FALSE))
 */
export function fUpperP(f: number, df1: number, df2: number): number {
  if (!(df1 > 0) || !(df2 > 0) || Number.isNaN(f)) return NaN
  if (f <= 0) return 1
  if (!Number.isFinite(f)) return 0
  if (!Number.isFinite(df2)) return 1 - jStat.chisquare.cdf(f * df1, df1)
  return Math.min(1, jStat.ibeta(df2 / (df2 + df1 * f), df2 / 2, df1 / 2))
}
