import { studentTUpperP } from '../student-t-upper-p'

/**
 * Two-sided p-value of a t statistic, P(|T_df| ≥ |t|), for any positive df (Satterthwaite df need
 * not be whole); df = Infinity is the standard normal.
 *
 * Formula: p = 2 · P(T_df ≥ |t|) = I_{df/(df+t²)}(df/2, ½) (Abramowitz & Stegun 1964, 26.7.1 with
 * 26.5.27), with the tail taken directly by studentTUpperP, so a p-value of 1e-300 keeps its
 * relative precision. It is 0 only for an infinite t, or when the exact value is below the
 * smallest double (about 5e-324).
 *
 * Guard errors: none; df ≤ 0 or a NaN input gives NaN.
 *
 * @example
 * studentTTwoSidedP(2.1, 7.3) // → 0.0722467134 (R: 2 * pt(-2.1, 7.3))
 * studentTTwoSidedP(-37, 1e8) // → 1.15049997768e-299 (R: 2 * pt(-37, 1e8))
 */
export function studentTTwoSidedP(t: number, df: number): number {
  if (!(df > 0) || Number.isNaN(t)) return Number.NaN
  return Math.min(1, 2 * studentTUpperP(Math.abs(t), df))
}
