import { describe, expect, it } from 'vitest'
import { cochranTest } from './cochran-test'

const labs = (p: number, n: number) => Array.from({ length: p }, (_, i) => ({ n, mean: 0, sd: 1 + i / 10 }))

describe('cochranTest', () => {
  it('reproduces published 5% critical values', () => {
    // Cochran test critical values (95% level), NMS Chemical and Biological Metrology (LGC) table,
    // l laboratories × n results: (5, 2) 0.841, (8, 2) 0.680, (10, 2) 0.602, (20, 2) 0.389,
    // (3, 3) 0.871, (4, 3) 0.768, (10, 3) 0.445, (10, 4) 0.373, (20, 4) 0.221, (5, 5) 0.544.
    const table: [number, number, number][] = [
      [5, 2, 0.841],
      [8, 2, 0.68],
      [10, 2, 0.602],
      [20, 2, 0.389],
      [3, 3, 0.871],
      [4, 3, 0.768],
      [10, 3, 0.445],
      [10, 4, 0.373],
      [20, 4, 0.221],
      [5, 5, 0.544],
    ]
    for (const [p, n, value] of table) {
      expect(Math.abs(cochranTest(labs(p, n)).critical.fivePercent - value)).toBeLessThanOrEqual(0.0006)
    }
  })

  it('reproduces published 1% critical values', () => {
    // Cochran's tables, upper 0.01 level (faculty.washington.edu/heagerty, Biostatistics tables),
    // k variances with df = n − 1: (5, df 1) 0.9279, (10, df 1) 0.7175, (3, df 2) 0.9423,
    // (4, df 2) 0.8643, (10, df 2) 0.5358, (10, df 3) 0.4469.
    const table: [number, number, number][] = [
      [5, 2, 0.9279],
      [10, 2, 0.7175],
      [3, 3, 0.9423],
      [4, 3, 0.8643],
      [10, 3, 0.5358],
      [10, 4, 0.4469],
    ]
    for (const [p, n, value] of table) {
      expect(Math.abs(cochranTest(labs(p, n)).critical.onePercent - value)).toBeLessThanOrEqual(0.00006)
    }
  })

  it('computes C for the largest variance and flags it', () => {
    // Hand-computed (common practice, no source): C = 0.81 / (0.01 + 0.04 + 0.81 + 0.0225).
    const r = cochranTest([
      { n: 2, mean: 10, sd: 0.1 },
      { n: 2, mean: 10, sd: 0.2 },
      { n: 2, mean: 10, sd: 0.9 },
      { n: 2, mean: 10, sd: 0.15 },
    ])
    expect(r.c).toBeCloseTo(0.81 / 0.8825, 12)
    expect(r.index).toBe(2)
    expect(r.flag).toBe('straggler')
    const outlier = cochranTest([
      { n: 2, mean: 10, sd: 0.01 },
      { n: 2, mean: 10, sd: 0.02 },
      { n: 2, mean: 10, sd: 0.9 },
      { n: 2, mean: 10, sd: 0.015 },
    ])
    expect(outlier.flag).toBe('outlier')
  })

  it('refuses thin or degenerate input', () => {
    expect(() => cochranTest([{ n: 2, mean: 1, sd: 1 }])).toThrow(/at least 2 laboratories/)
    expect(() =>
      cochranTest([
        { n: 1, mean: 1, sd: 0 },
        { n: 1, mean: 1, sd: 0 },
      ]),
    ).toThrow(/at least two results per laboratory/)
    expect(() =>
      cochranTest([
        { n: 3, mean: 1, sd: 0 },
        { n: 3, mean: 1, sd: 0 },
      ]),
    ).toThrow(/every laboratory SD is 0/)
  })
})
