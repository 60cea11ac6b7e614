import betainc from '@stdlib/math-base-special-betainc'
import gammaln from '@stdlib/math-base-special-gammaln'
import tQuantile from '@stdlib/stats-base-dists-t-quantile'
import { normalQuantile } from './normal-quantile'
import { studentTUpperP } from './student-t-upper-p'

/** Above this df stdlib's inverse incomplete beta breaks down (it returns 0 from df ≈ 1e15). */
const EXPANSION_DF = 1e12
/** Beyond this |t| stdlib's intermediate df/(df + t²) is subnormal or 0 and loses its digits. */
const LEADING_TERM_T = 1e150
/** Newton on the tail from a Cornish–Fisher start converges in 3–4 steps in this region. */
const NEWTON_MIN_DF = 1
const NEWTON_MIN_TAIL = 1e-12
const NEWTON_STEPS = 12

/**
 * Lower-tail quantile of Student's t distribution: the t with P(T_df ≤ t) = p, for any positive
 * df (Satterthwaite df need not be whole); df = Infinity is the standard normal.
 *
 * Formula: t = sign(p − ½) · √(df (1 − z) / z) with z solving I_z(df/2, ½) = 2 min(p, 1 − p)
 * (Abramowitz & Stegun 1964, 26.7.1 with 26.5.27), z and 1 − z from stdlib's inverse incomplete
 * beta. Two regions need other routes, both exact to double precision there:
 *   - df > 1e12: the Cornish–Fisher expansion t = x + g1(x)/df + g2(x)/df² around the normal
 *     quantile x (A&S 26.7.5); the next term is below 1e-30 relative for p ≥ 1e-300.
 *   - |t| > 1e150 (df below 2 and tiny p): the leading term of the series, 2 min(p, 1 − p) =
 *     z^{df/2} / ((df/2) B(df/2, ½)), solved for z in logarithms; its relative error is of order z.
 * For a two-sided critical value t_{1−α/2} pass 1 − α/2 (exact in floating point for α ≤ 1).
 * For df ≥ 1 and tail probabilities above 1e-12 — every confidence interval — the quantile is
 * instead found by Newton's method on the accurate upper tail, started from the Cornish–Fisher
 * expansion (as R's qt refines its start, Hill 1970, CACM 13:619): stdlib's inverse incomplete
 * beta takes up to milliseconds for some non-integer df, which dozens of intervals per analysis
 * cannot afford; both routes agree to ~1e-15.
 *
 * Guard errors: none; df ≤ 0, p outside [0, 1] or NaN gives NaN; p = 0 and 1 give ∓∞.
 *
 * @example
 * studentTQuantile(0.975, 30)  // → 2.0422724563012378 (R: qt(0.975, 30))
 * studentTQuantile(0.025, 7.3) // → -2.3450667365477 (R: qt(0.025, 7.3))
 * studentTQuantile(1e-300, 1)  // → -3.1830988618381e+299 (R: qt(1e-300, 1) = -3.183098861837907e+299)
 */
export function studentTQuantile(p: number, df: number): number {
  if (!(df > 0) || !(p >= 0 && p <= 1)) return Number.NaN
  if (p === 0) return -Infinity
  if (p === 1) return Infinity
  if (df > EXPANSION_DF) {
    const x = normalQuantile(p)
    const x2 = x * x
    return x + (x * (x2 + 1)) / (4 * df) + (x * ((5 * x2 + 16) * x2 + 3)) / (96 * df * df)
  }
  const tail = Math.min(p, 1 - p)
  if (df >= NEWTON_MIN_DF && tail >= NEWTON_MIN_TAIL) {
    const x = newtonUpperQuantile(tail, df)
    if (x !== null) return p < 0.5 ? -x : x
  }
  const t = tQuantile(p, df)
  if (Math.abs(t) <= LEADING_TERM_T) return t
  const half = df / 2
  const logZ = (Math.log(2 * Math.min(p, 1 - p)) + Math.log(half * betainc(1, half, 0.5, false))) / half
  const magnitude = Math.exp((Math.log(df) - logZ) / 2)
  return p < 0.5 ? -magnitude : magnitude
}

/** The x > 0 with P(T_df > x) = tail, by Newton steps on the tail from the Cornish–Fisher start; null if it does not settle. */
function newtonUpperQuantile(tail: number, df: number): number | null {
  const z = -normalQuantile(tail)
  const z2 = z * z
  // A&S 26.7.5, three correction terms.
  let x =
    z +
    (z * (z2 + 1)) / (4 * df) +
    (z * ((5 * z2 + 16) * z2 + 3)) / (96 * df * df) +
    (z * (((3 * z2 + 19) * z2 + 17) * z2 - 15)) / (384 * df * df * df)
  if (!(x > 0) || !Number.isFinite(x)) return null
  const logNorm = gammaln((df + 1) / 2) - gammaln(df / 2) - 0.5 * Math.log(df * Math.PI)
  for (let i = 0; i < NEWTON_STEPS; i++) {
    const density = Math.exp(logNorm - ((df + 1) / 2) * Math.log1p((x * x) / df))
    const step = (studentTUpperP(x, df) - tail) / density
    const next = x + step
    if (!(next > 0)) return null
    x = next
    if (Math.abs(step) <= 4e-16 * x) return x
  }
  return null
}
