import { describe, expect, it } from 'vitest'
import { noncentralTCdf } from './noncentral-t-cdf'

// Reference: R 4.x pt(x, df, ncp) (exact algorithm for ncp below 37.62).
const cases: [x: number, df: number, ncp: number, r: number][] = [
  [2.04, 30, 2.9, 0.1981233185],
  [14.2, 30, 14.1, 0.490665604163],
  [13.9, 30, 14.1, 0.433267567726],
  [14.1, 2, 30, 0.01125600731],
  [14.1, 2, 25, 0.04427214426],
  [12.7, 1, 30, 0.01852690562],
  [16, 2, 15, 0.4164519903],
  [20, 2, 36, 0.0397011800405],
  [35, 3000, 35, 0.49887974311],
  [36, 3000, 35, 0.817029364355],
  [30, 200, 30, 0.489785752],
  [3, 2, 15, 1.18304159033e-9],
]

// Where R's pt is an approximation or fails (df above 4e5, where R switches to a normal
// approximation, and λ near 37 at large df, where R's series breaks down: pt(38.64, 4e5, 37) =
// 0.99999999999907 with a precision warning), the reference is the defining mixture integrated by
// mpmath 1.3.0 at 30 digits: quad(Φ(x u/√ν − λ) · chi_ν(u), [0, ∞)). The small-df rows agree with
// R's pt to 1e-12 (R: pt(1170, 2, 37) = 0.9989996985312324, pt(45, 12, 37) = 0.7749256282632093).
const exactCases: [x: number, df: number, ncp: number, exact: number][] = [
  [1.96, 2e7, 3, 0.1491699562408025],
  [4, 2e6, 8, 3.16722455729997e-5],
  [-2, 4e5, -3, 0.8413444436067441],
  [38.64, 4e5, 37, 0.9493358281948227],
  [31.6, 2e7, 30, 0.945198449270352],
  [1170, 2, 37, 0.9989996985321579],
  [45, 12, 37, 0.7749256282640994],
  [15, 40, 14, 0.675655474572947],
]

describe('noncentralTCdf', () => {
  it.each(cases)('P(T′ ≤ %f | df %f, ncp %f) matches R pt', (x, df, ncp, r) => {
    expect(Math.abs(noncentralTCdf(x, df, ncp) - r)).toBeLessThan(1e-9)
  })

  it.each(exactCases)('P(T′ ≤ %f | df %f, ncp %f) matches a 30-digit quadrature', (x, df, ncp, exact) => {
    expect(Math.abs(noncentralTCdf(x, df, ncp) - exact)).toBeLessThan(1e-9)
  })

  it('is continuous where it switches method', () => {
    // Common practice, no source: both methods agree at each switch (λ = 14 for df ≥ 30, and
    // λ = 37 below df 30).
    expect(Math.abs(noncentralTCdf(15, 40, 14) - noncentralTCdf(15, 40, 14 + 1e-9))).toBeLessThan(1e-9)
    expect(Math.abs(noncentralTCdf(45, 12, 37) - noncentralTCdf(45, 12, 37 + 1e-9))).toBeLessThan(1e-9)
  })

  it('mirrors in the sign of x and λ: P(T′ ≤ x | λ) = 1 − P(T′ ≤ −x | −λ)', () => {
    // Common practice, no source: T′(−λ) has the distribution of −T′(λ).
    for (const [x, df, ncp] of [
      [2.5, 7, 3],
      [40, 3000, 35],
    ]) {
      expect(noncentralTCdf(x, df, ncp) + noncentralTCdf(-x, df, -ncp)).toBeCloseTo(1, 12)
    }
  })

  it('returns NaN for impossible arguments', () => {
    expect(noncentralTCdf(1, 0, 1)).toBeNaN()
    expect(noncentralTCdf(Number.NaN, 3, 1)).toBeNaN()
    expect(noncentralTCdf(1, 3, Infinity)).toBeNaN()
  })
})
