import jStat from 'jstat'

/** Above this noncentrality jStat's series (200 Poisson terms counted from 0) can miss most of its mass. */
const SERIES_LIMIT = 14
/** Simpson intervals over the central 1 − 2·10⁻¹⁵ of the chi distribution. */
const INTERVALS = 1024

/**
 * Cumulative distribution function of the noncentral t distribution, P(T′ ≤ x) with ν degrees
 * of freedom and noncentrality λ.
 *
 * For |λ| ≤ 14 this is jStat's series (Lenth 1989, Applied Statistics 38:185, algorithm AS 243
 * style). jStat sums a fixed 200 Poisson-weighted terms starting from 0, which loses the mass
 * around term λ²/2 once λ is large (e.g. ν = 2, x = 14.1, λ = 30: jStat 3e-41, R's pt 0.01126).
 * So for |λ| > 14 it uses the defining mixture instead (Johnson, Kotz & Balakrishnan 1995,
 * Continuous Univariate Distributions vol. 2, ch. 31):
 *   P(T′ ≤ x) = E[ Φ(x · √(V/ν) − λ) ],  V ~ χ²_ν,
 * written over u = √V (so the density is smooth at 0 for ν = 1) and integrated by the composite
 * Simpson rule (1024 intervals) with jStat's normal cdf and chi-square density and quantile.
 *
 * Guard errors: none; callers validate ν > 0 (it returns NaN for invalid arguments).
 *
 * @example
 * noncentralTCdf(2.0422724, 30, 2.9019050) // → 0.1982331 (R: pt(2.0422724, 30, 2.901905))
 * noncentralTCdf(14.1, 2, 30)              // → 0.011256  (R: pt(14.1, 2, 30) = 0.01125600731)
 */
export function noncentralTCdf(x: number, df: number, ncp: number): number {
  if (!(df > 0) || !Number.isFinite(x) || !Number.isFinite(ncp)) return Number.NaN
  if (Math.abs(ncp) <= SERIES_LIMIT) return jStat.noncentralt.cdf(x, df, ncp)
  const scale = x / Math.sqrt(df)
  const density = (u: number) =>
    u <= 0 ? (df === 1 ? 2 * jStat.normal.pdf(0, 0, 1) : 0) : 2 * u * jStat.chisquare.pdf(u * u, df)
  const integrand = (u: number) => jStat.normal.cdf(scale * u - ncp, 0, 1) * density(u)
  const low = Math.sqrt(jStat.chisquare.inv(1e-15, df))
  const high = Math.sqrt(jStat.chisquare.inv(1 - 1e-15, df))
  const value = simpson(integrand, Number.isFinite(low) ? low : 0, high, INTERVALS)
  return Math.min(1, Math.max(0, value))
}

/** Composite Simpson rule with a fixed, even number of intervals (bounded cost, no recursion). */
function simpson(f: (u: number) => number, a: number, b: number, intervals: number): number {
  const h = (b - a) / intervals
  let sum = f(a) + f(b)
  for (let i = 1; i < intervals; i++) sum += (i % 2 === 1 ? 4 : 2) * f(a + i * h)
  return (sum * h) / 3
}
