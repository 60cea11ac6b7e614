import { describe, expect, it } from 'vitest'
import { normalQuantile } from './normal-quantile'

// [p, z with P(Z ≤ z) = p] from R 4.2.2: qnorm(p); R's qnorm is the same algorithm (AS 241) and
// agrees with the exact root (mpmath 1.3.0, 40 digits) to 4.4e-16 on these rows. The rows cover
// all three rational approximations (|p − ½| ≤ 0.425, r ≤ 5, r > 5) and p = 1e-17, where stdlib's
// erfinv-based quantile returns −∞.
const quantiles: [p: number, z: number][] = [
  [0.5, 0],
  [0.6, 0.2533471031357998],
  [0.9, 1.2815515655446008],
  [0.975, 1.9599639845400536],
  [0.999999, 4.753424308817089],
  [0.3, -0.5244005127080407],
  [0.075, -1.4395314709384557],
  [0.074, -1.4466320671589785],
  [0.025, -1.9599639845400538],
  [1e-5, -4.2648907939228256],
  [1e-10, -6.361340902404056],
  [1e-17, -8.4937932241096],
  [4.7e-22, -9.5832920109712],
  [1e-100, -21.27345356096532],
  [1e-300, -37.0470962993612],
]

describe('normalQuantile', () => {
  it.each(quantiles)('qnorm(%s) matches R to 1e-14 relative', (p, z) => {
    const value = normalQuantile(p)
    if (z === 0) expect(value).toBe(0)
    else expect(Math.abs(value / z - 1)).toBeLessThan(1e-14)
  })

  it('gives the infinite ends and NaN outside [0, 1]', () => {
    expect(normalQuantile(0)).toBe(-Infinity)
    expect(normalQuantile(1)).toBe(Infinity)
    expect(normalQuantile(-0.1)).toBeNaN()
    expect(normalQuantile(Number.NaN)).toBeNaN()
  })
})
