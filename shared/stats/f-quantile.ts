import fQuantileStdlib from '@stdlib/stats-base-dists-f-quantile'

/**
 * Lower-tail quantile of the F distribution: the f with P(F_{df1, df2} ≤ f) = p, for any positive
 * finite df (Satterthwaite df need not be whole).
 *
 * Formula: f = df2 x / (df1 (1 − x)) with x solving I_x(df1/2, df2/2) = p (Abramowitz & Stegun
 * 1964, 26.6.2), x and 1 − x both from stdlib's inverse incomplete beta, so neither is rounded.
 * For an upper critical value F_{1−α} pass 1 − α. Measured against the exact root (mpmath, 40
 * digits): relative error below 3e-15 up to df2 1e7 and 1.8e-10 at df2 1e8 (df1 40). df2 = Infinity
 * would need a χ² quantile, which none of the installed packages gives accurately, so it is NaN.
 *
 * Guard errors: none; df ≤ 0 or not finite, p outside [0, 1] or NaN gives NaN.
 *
 * @example
 * fQuantile(0.95, 2, 13.7) // → 3.7577178039207 (R: qf(0.95, 2, 13.7))
 * fQuantile(0.975, 5, 24)  // → 3.1548163425331 (R: qf(0.975, 5, 24))
 */
export function fQuantile(p: number, df1: number, df2: number): number {
  if (!(df1 > 0 && df2 > 0 && Number.isFinite(df1) && Number.isFinite(df2))) return Number.NaN
  if (!(p >= 0 && p <= 1)) return Number.NaN
  return fQuantileStdlib(p, df1, df2)
}
