import normalCdf from '@stdlib/stats-base-dists-normal-cdf'

/**
 * Upper-tail probability of the standard normal distribution, P(Z ≥ z).
 *
 * Formula: P(Z ≥ z) = Φ(−z) = ½ erfc(z / √2) (Abramowitz & Stegun 1964, §26.2 and §7.1), taken
 * as stdlib's normal cdf at −z. The tail is evaluated directly, never as 1 − Φ(z), so it keeps its
 * relative precision all the way down to the smallest double (z ≈ 38.5); beyond that the exact
 * value is not representable and the result is 0.
 *
 * Guard errors: none; a NaN input gives NaN.
 *
 * @example
 * normalUpperP(1.959963984540054) // → 0.025 (R: pnorm(1.959963984540054, lower.tail = FALSE))
 * normalUpperP(37)                // → 5.7255712225251e-300 (R: pnorm(37, lower.tail = FALSE) = 5.7255712225246e-300)
 */
export function normalUpperP(z: number): number {
  return normalCdf(-z, 0, 1)
}
