import betainc from '@stdlib/math-base-special-betainc'
import tCdf from '@stdlib/stats-base-dists-t-cdf'
import { normalUpperP } from './normal-upper-p'

/**
 * Upper-tail probability of Student's t distribution, P(T_df ≥ t), for any positive df
 * (Satterthwaite df need not be whole); df = Infinity is the standard normal.
 *
 * Formula: P(T_df ≥ t) = ½ I_z(df/2, ½), z = df/(df + t²), for t ≥ 0 (Abramowitz & Stegun 1964,
 * 26.7.1 with 26.5.27), evaluated by stdlib's t cdf at −t. stdlib takes the regularised incomplete
 * beta on whichever of z and 1 − z is small, upper or lower as needed, so the tail is computed
 * directly (never as 1 − cdf) and keeps its relative precision down to 1e-300, at df up to 1e8
 * and beyond. When t² overflows (|t| > 1.3e154, which matters only for df < 2) z is not
 * representable, so the leading term of the series, z^{df/2} / ((df/2) B(df/2, ½)), is taken in
 * logarithms; its relative error is of order z < 1e-300.
 *
 * Guard errors: none; df ≤ 0 or a NaN input gives NaN.
 *
 * @example
 * studentTUpperP(2.1, 7.3)       // → 0.0361233567124 (R: pt(2.1, 7.3, lower.tail = FALSE))
 * studentTUpperP(-0.01, 1717993) // → 0.5039893557340673 (R: pt(0.01, 1717993))
 * studentTUpperP(1e200, 1)       // → 3.18309886183779e-201 (R: pt(1e200, 1, lower.tail = FALSE))
 */
export function studentTUpperP(t: number, df: number): number {
  if (!(df > 0) || Number.isNaN(t)) return Number.NaN
  if (df === Infinity) return normalUpperP(t)
  if (t > 0 && t * t === Infinity) {
    const half = df / 2
    const logZ = Math.log(df) - 2 * Math.log(t)
    return Math.exp(half * logZ - Math.log(half * betainc(1, half, 0.5, false)) - Math.LN2)
  }
  return tCdf(-t, df)
}
