import { describe, expect, it } from 'vitest'
import { labPrecision } from './lab-precision'
import { oneWayAnova } from './one-way-anova'
import { dyestuffGroups } from './fixtures/dyestuff-groups'

function summarise(groups: number[][]) {
  return groups.map((g) => {
    const mean = g.reduce((a, b) => a + b, 0) / g.length
    const sd = g.length > 1 ? Math.sqrt(g.reduce((s, v) => s + (v - mean) ** 2, 0) / (g.length - 1)) : 0
    return { n: g.length, mean, sd }
  })
}

describe('labPrecision', () => {
  it('reproduces the Dyestuff variance components with batches as laboratories', () => {
    // Dyestuff (Davies & Goldsmith 1972), lme4 REML = balanced ANOVA: σ² 2451.25, σ_batch² 1764.05,
    // mean 1527.5 (STATS.md check values). s_R² = 4215.3; r = 2.8 s_r, R = 2.8 s_R (ISO 5725-2).
    const r = labPrecision(summarise(dyestuffGroups))
    expect(r.p).toBe(6)
    expect(r.grandMean).toBeCloseTo(1527.5, 10)
    expect(r.sr ** 2).toBeCloseTo(2451.25, 6)
    expect(r.sL ** 2).toBeCloseTo(1764.05, 6)
    expect(r.sR ** 2).toBeCloseTo(4215.3, 6)
    expect(r.r).toBeCloseTo(2.8 * Math.sqrt(2451.25), 8)
    expect(r.R).toBeCloseTo(2.8 * Math.sqrt(4215.3), 8)
    expect(r.nBar).toBe(5)
    expect(r.sd2).toBeCloseTo(11271.5, 6)
    expect(r.sLTruncated).toBe(false)
  })

  it('uses the unbalanced formulas, which equal the one-way ANOVA estimates', () => {
    // ISO 5725-2 §7.4.5 formulas vs R aov on the same invented data (MSW 0.460166667, n0 3.380952).
    const groups = [
      [12.1, 13.4, 11.8, 12.9],
      [14.2, 15.1, 13.7],
      [11.0, 10.4, 12.2, 11.5, 10.9],
      [13.3, 12.8],
    ]
    const r = labPrecision(summarise(groups))
    const anova = oneWayAnova(groups)
    expect(r.sr ** 2).toBeCloseTo(0.460166667, 8)
    expect(r.nBar).toBeCloseTo(3.38095238095, 10)
    expect(r.sL ** 2).toBeCloseTo(anova.varianceBetween, 10)
    expect(r.sd2).toBeCloseTo(6.380634921, 8)
  })

  it('accepts laboratories with a single result and truncates a negative s_L² at 0', () => {
    const r = labPrecision([
      { n: 3, mean: 10.0, sd: 2 },
      { n: 3, mean: 10.1, sd: 2 },
      { n: 1, mean: 9.9, sd: 0 },
    ])
    expect(r.sLTruncated).toBe(true)
    expect(r.sL).toBe(0)
    expect(r.sR).toBeCloseTo(r.sr, 12)
    expect(r.sr).toBeCloseTo(2, 12)
  })

  it('refuses thin or malformed input', () => {
    expect(() => labPrecision([{ n: 3, mean: 1, sd: 1 }])).toThrow(/at least 2 laboratories/)
    expect(() =>
      labPrecision([
        { n: 1, mean: 1, sd: 0 },
        { n: 1, mean: 2, sd: 0 },
      ]),
    ).toThrow(/at least one laboratory with two or more results/)
    expect(() =>
      labPrecision([
        { n: 3, mean: 1, sd: -1 },
        { n: 3, mean: 2, sd: 1 },
      ]),
    ).toThrow(/SD of laboratory 1/)
  })
})
