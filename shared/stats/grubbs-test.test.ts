import { describe, expect, it } from 'vitest'
import { grubbsTest } from './grubbs-test'

describe('grubbsTest', () => {
  it('reproduces the published single-Grubbs critical values', () => {
    // Critical values for Grubbs' test, G(α, n), LibreTexts Analytical Chemistry reference table
    // "Appendix 07" (same values as ISO 5725-2 Table 5 for one largest or one smallest):
    // n = 3: 1.155 / 1.155, 4: 1.481 / 1.496, 8: 2.126 / 2.274, 10: 2.290 / 2.482,
    // 12: 2.412 / 2.636, 14: 2.507 / 2.755 (5% / 1%). The formula agrees within 0.001
    // (n = 8 at 5%: 2.1266 against the printed 2.126).
    const table: [number, number, number][] = [
      [3, 1.155, 1.155],
      [4, 1.481, 1.496],
      [8, 2.126, 2.274],
      [10, 2.29, 2.482],
      [12, 2.412, 2.636],
      [14, 2.507, 2.755],
    ]
    for (const [n, five, one] of table) {
      const { critical } = grubbsTest(Array.from({ length: n }, (_, i) => i * i))
      expect(Math.abs(critical.fivePercent - five)).toBeLessThanOrEqual(0.001)
      expect(Math.abs(critical.onePercent - one)).toBeLessThanOrEqual(0.001)
    }
  })

  it('computes G for the largest and smallest value and flags them', () => {
    // Hand-computed (common practice, no source): mean 10.5, SD 0.98995, G_high = 2/0.98995.
    const r = grubbsTest([10.1, 10.3, 9.9, 10.0, 10.2, 12.5])
    expect(r.mean).toBeCloseTo(10.5, 12)
    expect(r.high.index).toBe(5)
    expect(r.high.g).toBeCloseTo(2 / 0.98994949366, 9)
    expect(r.high.flag).toBe('outlier')
    expect(r.low.index).toBe(2)
    expect(r.low.g).toBeCloseTo(0.6 / 0.98994949366, 9)
    expect(r.low.flag).toBe('ok')
  })

  it('refuses thin or degenerate input', () => {
    expect(() => grubbsTest([1, 2])).toThrow(/at least three values/)
    expect(() => grubbsTest([1, 2, Number.NaN])).toThrow(/value 3 is not a finite number/)
    expect(() => grubbsTest([4, 4, 4])).toThrow(/all values are equal/)
    expect(() => grubbsTest(undefined as never)).toThrow(/got 0/)
  })
})
