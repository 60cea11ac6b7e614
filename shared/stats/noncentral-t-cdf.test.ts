import { describe, expect, it } from 'vitest'
import jStat from 'jstat'
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

describe('noncentralTCdf', () => {
  it.each(cases)('P(T′ ≤ %f | df %f, ncp %f) matches R pt', (x, df, ncp, r) => {
    expect(Math.abs(noncentralTCdf(x, df, ncp) - r)).toBeLessThan(1e-9)
  })

  it('fixes the large-noncentrality cases where the plain jStat series loses its mass', () => {
    // R pt(14.1, 2, 30) = 0.01125600731; jStat's fixed 200-term series returns about 3e-41.
    expect(jStat.noncentralt.cdf(14.1, 2, 30)).toBeLessThan(1e-30)
    expect(noncentralTCdf(14.1, 2, 30)).toBeCloseTo(0.01125600731, 9)
  })

  it('is continuous where it switches method (λ = 14)', () => {
    // Common practice, no source: both methods agree at the switch.
    const below = noncentralTCdf(15, 12, 14)
    const above = noncentralTCdf(15, 12, 14 + 1e-9)
    expect(Math.abs(below - above)).toBeLessThan(1e-9)
  })

  it('returns NaN for impossible arguments', () => {
    expect(noncentralTCdf(1, 0, 1)).toBeNaN()
    expect(noncentralTCdf(Number.NaN, 3, 1)).toBeNaN()
    expect(noncentralTCdf(1, 3, Infinity)).toBeNaN()
  })
})
