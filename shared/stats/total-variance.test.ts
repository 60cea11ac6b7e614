import { describe, expect, it } from 'vitest'
import { totalVariance } from './total-variance'

describe('totalVariance', () => {
  it('squares an SD and passes a variance through', () => {
    expect(totalVariance({ sdTotal: 3 }, 'x')).toBe(9)
    expect(totalVariance({ variance: 5 }, 'x')).toBe(5)
  })

  it('requires exactly one positive value', () => {
    expect(() => totalVariance({}, 'clusterPower')).toThrow(
      /clusterPower requires exactly one of sdTotal or variance/,
    )
    expect(() => totalVariance({ sdTotal: 1, variance: 1 }, 'x')).toThrow(/exactly one/)
    expect(() => totalVariance({ sdTotal: 0 }, 'x')).toThrow(/sdTotal must be a positive number/)
    expect(() => totalVariance({ variance: -2 }, 'x')).toThrow(/variance must be a positive number/)
    expect(() => totalVariance({ variance: Number.NaN }, 'x')).toThrow(/positive number/)
    expect(() => totalVariance(undefined as never, 'x')).toThrow(/exactly one/)
  })
})
