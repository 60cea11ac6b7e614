import { describe, expect, it } from 'vitest'
import { mandelH } from './mandel-h'

const labsWithMeans = (means: number[]) => means.map((mean) => ({ n: 2, mean, sd: 1 }))

describe('mandelH', () => {
  it('reproduces the 1% critical values of ISO 5725-2:1994 Table 6', () => {
    // ISO 5725-2:1994 Table 6 (1% level) as reproduced on metrology.wordpress.com ("Indicators for
    // Mandel's h and k statistics at 1% significance level"): p = 3: 1.15, 4: 1.49, 5: 1.72,
    // 8: 2.06, 10: 2.18, 12: 2.25, 14: 2.30. Table values are rounded to 2 decimals.
    const table: [number, number][] = [
      [3, 1.15],
      [4, 1.49],
      [5, 1.72],
      [8, 2.06],
      [10, 2.18],
      [12, 2.25],
      [14, 2.3],
    ]
    for (const [p, value] of table) {
      const means = Array.from({ length: p }, (_, i) => i)
      expect(Math.abs(mandelH(labsWithMeans(means)).critical.onePercent - value)).toBeLessThanOrEqual(0.0051)
    }
  })

  it('matches the 5% critical value for p = 3 and p = 10', () => {
    // From memory (ISO 5725-2 Table 6, 5% level): p = 3 → 1.15, p = 10 → 1.80.
    expect(mandelH(labsWithMeans([1, 2, 4])).critical.fivePercent).toBeCloseTo(1.15, 2)
    expect(mandelH(labsWithMeans([1, 2, 4, 5, 6, 7, 8, 9, 10, 12])).critical.fivePercent).toBeCloseTo(1.8, 2)
  })

  it('standardises each laboratory mean by the spread of the means and flags extremes', () => {
    // Hand-computed (common practice, no source): means 10, 11, 12, 16 → mean 12.25, SD √(21/3).
    const r = mandelH(labsWithMeans([10, 11, 12, 16]))
    const sd = Math.sqrt((2.25 ** 2 + 1.25 ** 2 + 0.25 ** 2 + 3.75 ** 2) / 3)
    expect(r.h[0]).toBeCloseTo(-2.25 / sd, 12)
    expect(r.h[3]).toBeCloseTo(3.75 / sd, 12)
    expect(r.h.reduce((a, b) => a + b, 0)).toBeCloseTo(0, 12)
    expect(r.flags).toEqual(['ok', 'ok', 'ok', 'straggler'])
  })

  it('refuses thin or degenerate input', () => {
    expect(() => mandelH(labsWithMeans([1, 2]))).toThrow(/at least 3 laboratories/)
    expect(() => mandelH(labsWithMeans([5, 5, 5]))).toThrow(/all laboratory means are equal/)
    expect(() =>
      mandelH([
        { n: 2, mean: 1, sd: 1 },
        { n: 2, mean: 2, sd: 1 },
        { n: 2, mean: Infinity, sd: 1 },
      ]),
    ).toThrow(/not a finite number/)
  })
})
