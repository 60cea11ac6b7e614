import { describe, expect, it } from 'vitest'
import { mandelK } from './mandel-k'

const labs = (p: number, n: number) => Array.from({ length: p }, (_, i) => ({ n, mean: 0, sd: 1 + i / 10 }))

describe('mandelK', () => {
  it('reproduces the 1% critical values of ISO 5725-2:1994 Table 6', () => {
    // ISO 5725-2:1994 Table 6 (1% level) as reproduced on metrology.wordpress.com: (p, n) →
    // (3, 2) 1.71, (3, 3) 1.64, (5, 4) 1.73, (8, 2) 2.25, (8, 3) 1.97, (8, 5) 1.71, (10, 2) 2.32,
    // (10, 10) 1.50, (14, 2) 2.39, (14, 6) 1.69. The exact formula (Wilrich 2013) agrees to the
    // last printed digit; a few table entries are off by up to 0.01 (e.g. (8, 3): formula 1.964),
    // so the check allows 0.01.
    const table: [number, number, number][] = [
      [3, 2, 1.71],
      [3, 3, 1.64],
      [5, 4, 1.73],
      [8, 2, 2.25],
      [8, 3, 1.97],
      [8, 5, 1.71],
      [10, 2, 2.32],
      [10, 10, 1.5],
      [14, 2, 2.39],
      [14, 6, 1.69],
    ]
    for (const [p, n, value] of table) {
      expect(Math.abs(mandelK(labs(p, n)).critical.onePercent - value)).toBeLessThanOrEqual(0.01)
    }
  })

  it('matches the 5% critical value for p = 3, n = 2', () => {
    // From memory (ISO 5725-2 Table 6, 5% level): p = 3, n = 2 → 1.65.
    expect(mandelK(labs(3, 2)).critical.fivePercent).toBeCloseTo(1.65, 2)
  })

  it('scales each SD by the pooled SD and flags large ones', () => {
    // Hand-computed (common practice, no source): k_i = s_i √p / √Σs².
    const r = mandelK([
      { n: 2, mean: 10, sd: 0.1 },
      { n: 2, mean: 10, sd: 0.2 },
      { n: 2, mean: 10, sd: 0.9 },
    ])
    const pooled = Math.sqrt((0.01 + 0.04 + 0.81) / 3)
    expect(r.k[2]).toBeCloseTo(0.9 / pooled, 12)
    expect(r.flags).toEqual(['ok', 'ok', 'straggler'])
    expect(r.balanced).toBe(true)
    expect(r.nUsed).toBe(2)
  })

  it('uses the rounded mean n for unequal numbers of results and says so', () => {
    const r = mandelK([
      { n: 3, mean: 1, sd: 0.1 },
      { n: 4, mean: 1, sd: 0.2 },
      { n: 4, mean: 1, sd: 0.3 },
    ])
    expect(r.nUsed).toBe(4)
    expect(r.balanced).toBe(false)
  })

  it('refuses thin or degenerate input', () => {
    expect(() => mandelK([{ n: 2, mean: 1, sd: 1 }])).toThrow(/at least 2 laboratories/)
    expect(() =>
      mandelK([
        { n: 1, mean: 1, sd: 0 },
        { n: 1, mean: 2, sd: 0 },
      ]),
    ).toThrow(/at least two results per laboratory/)
    expect(() =>
      mandelK([
        { n: 2, mean: 1, sd: 0 },
        { n: 2, mean: 2, sd: 0 },
      ]),
    ).toThrow(/every laboratory SD is 0/)
  })
})
