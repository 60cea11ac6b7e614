import { describe, expect, it } from 'vitest'
import { normalUpperP } from './normal-upper-p'

// [z, P(Z ≥ z)] from R 4.2.2: pnorm(z, lower.tail = FALSE).
const upperTail: [z: number, p: number][] = [
  [-5, 0.9999997133484281],
  [0, 0.5],
  [0.5, 0.30853753872598694],
  [1.959963984540054, 0.025000000000000012],
  [3, 0.0013498980316300946],
  [8.3, 5.205569744890255e-17],
  [10, 7.619853024160527e-24],
  [20, 2.7536241186062337e-89],
  [30, 4.906713927148187e-198],
  [37, 5.725571222524577e-300],
]

describe('normalUpperP', () => {
  it.each(upperTail)('P(Z ≥ %s) matches R to 1e-10 relative', (z, p) => {
    expect(Math.abs(normalUpperP(z) / p - 1)).toBeLessThan(1e-10)
  })

  it('keeps a subnormal tail instead of 0', () => {
    // mpmath 1.3.0 (40 digits): erfc(38/√2)/2 = 2.885428360068784e-316, whose nearest (subnormal)
    // double is 2.88542835e-316; R 4.2.2's pnorm gives 0. Subnormals carry about eight digits here.
    expect(Math.abs(normalUpperP(38) / 2.88542835e-316 - 1)).toBeLessThan(1e-6)
  })

  it('is 0 and 1 at the infinite ends and NaN for NaN', () => {
    expect(normalUpperP(Infinity)).toBe(0)
    expect(normalUpperP(-Infinity)).toBe(1)
    expect(normalUpperP(Number.NaN)).toBeNaN()
  })
})
