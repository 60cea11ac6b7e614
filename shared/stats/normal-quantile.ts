/** Coefficients of AS 241, lowest power first: Wichura's (1988) 20-digit values, as doubles. */
const CENTRAL_NUMERATOR = [
  3.3871328727963665, 133.14166789178438, 1971.5909503065513, 13731.69376550946, 45921.95393154987,
  67265.7709270087, 33430.57558358813, 2509.0809287301227,
]
const CENTRAL_DENOMINATOR = [
  1, 42.31333070160091, 687.1870074920579, 5394.196021424751, 21213.794301586597, 39307.89580009271,
  28729.085735721943, 5226.495278852854,
]
const INTERMEDIATE_NUMERATOR = [
  1.4234371107496835, 4.630337846156546, 5.769497221460691, 3.6478483247632045, 1.2704582524523684,
  0.2417807251774506, 0.022723844989269184, 0.0007745450142783414,
]
const INTERMEDIATE_DENOMINATOR = [
  1, 2.053191626637759, 1.6763848301838038, 0.6897673349851, 0.14810397642748008, 0.015198666563616457,
  0.0005475938084995345, 1.0507500716444169e-9,
]
const FAR_NUMERATOR = [
  6.657904643501103, 5.463784911164114, 1.7848265399172913, 0.29656057182850487, 0.026532189526576124,
  0.0012426609473880784, 0.000027115555687434876, 2.0103343992922881e-7,
]
const FAR_DENOMINATOR = [
  1, 0.599832206555888, 0.1369298809227358, 0.014875361290850615, 0.0007868691311456133,
  0.000018463183175100548, 1.421511758316446e-7, 2.0442631033899397e-15,
]

/**
 * Lower-tail quantile of the standard normal distribution: the z with P(Z ≤ z) = p.
 *
 * Algorithm AS 241 (Wichura 1988, Applied Statistics 37:477, PPND16): three rational
 * approximations, in p − ½ for 0.075 ≤ p ≤ 0.925 and in r = √(−ln min(p, 1 − p)) in the tails,
 * relative accuracy about 1e-16 for min(p, 1 − p) ≥ 1e-300. It is the algorithm of R's qnorm.
 * stdlib's normal quantile is not used because it evaluates erfinv(2p − 1): rounding 2p − 1 costs
 * relative precision below p ≈ 1e-8 and gives −∞ below p ≈ 6e-17.
 *
 * Guard errors: none; p outside [0, 1] or NaN gives NaN, p = 0 gives −∞ and p = 1 gives +∞.
 *
 * @example
 * normalQuantile(0.975)  // → 1.959963984540054 (R: qnorm(0.975))
 * normalQuantile(1e-300) // → -37.0470962993612 (R: qnorm(1e-300))
 */
export function normalQuantile(p: number): number {
  if (!(p >= 0 && p <= 1)) return Number.NaN
  if (p === 0) return -Infinity
  if (p === 1) return Infinity
  const q = p - 0.5
  if (Math.abs(q) <= 0.425) {
    const r = 0.180625 - q * q
    return q * rational(CENTRAL_NUMERATOR, CENTRAL_DENOMINATOR, r)
  }
  // 1 − p is exact for p > 0.5 (Sterbenz), so the upper tail loses nothing here.
  const tail = q < 0 ? p : 1 - p
  const r = Math.sqrt(-Math.log(tail))
  const magnitude =
    r <= 5
      ? rational(INTERMEDIATE_NUMERATOR, INTERMEDIATE_DENOMINATOR, r - 1.6)
      : rational(FAR_NUMERATOR, FAR_DENOMINATOR, r - 5)
  return q < 0 ? -magnitude : magnitude
}

function rational(numerator: number[], denominator: number[], x: number): number {
  let top = 0
  let bottom = 0
  for (let i = numerator.length - 1; i >= 0; i--) {
    top = top * x + numerator[i]
    bottom = bottom * x + denominator[i]
  }
  return top / bottom
}
