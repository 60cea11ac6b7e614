import { describe, expect, it } from 'vitest'
import { unitSizeSummary } from './unit-size-summary'

describe('unitSizeSummary', () => {
  it('returns the mean and the divisor-k coefficient of variation', () => {
    // Common practice, no source: hand-computed; sizes 2, 4, 6 → mean 4, SD √(8/3).
    const r = unitSizeSummary([2, 4, 6], 'test')
    expect(r.meanSize).toBe(4)
    expect(r.cv).toBeCloseTo(Math.sqrt(8 / 3) / 4, 12)
  })

  it('names the caller in its errors', () => {
    expect(() => unitSizeSummary([], 'someCaller')).toThrow(/someCaller requires at least one unit size/)
    expect(() => unitSizeSummary([1, -2], 'someCaller')).toThrow(
      /someCaller: every unit size must be a positive number/,
    )
    expect(() => unitSizeSummary([1, Infinity], 'x')).toThrow(/positive number/)
  })
})
