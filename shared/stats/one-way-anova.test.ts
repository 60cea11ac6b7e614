import { describe, expect, it } from 'vitest'
import seedrandom from 'seedrandom'
import { oneWayAnova } from './one-way-anova'
import { EngineInputError } from './engine-input-error'
import { dyestuffGroups } from './fixtures/dyestuff-groups'
import { dyestuff2Groups } from './fixtures/dyestuff2-groups'
import { normalQuantile } from './normal-quantile'

describe('oneWayAnova', () => {
  it('reproduces the Dyestuff analysis of variance', () => {
    const r = oneWayAnova(dyestuffGroups)
    // Dyestuff (Davies & Goldsmith 1972), R 4.x anova(aov(Yield ~ Batch, Dyestuff)):
    // MSB 11271.50, MSW 2451.25, F 4.59827, p 0.0043975.
    expect(r.msb).toBeCloseTo(11271.5, 6)
    expect(r.msw).toBeCloseTo(2451.25, 6)
    expect(r.f).toBeCloseTo(4.59826619, 6)
    expect(r.p).toBeCloseTo(0.00439753, 6)
    expect(r.dfBetween).toBe(5)
    expect(r.dfWithin).toBe(24)
    expect(r.n0).toBe(5)
    // σ_batch² 1764.05 equals the lme4 REML estimate for balanced data (STATS.md check values).
    expect(r.varianceBetween).toBeCloseTo(1764.05, 6)
    // ICC 0.4185 (STATS.md, from the lme4 REML components).
    expect(r.icc).toBeCloseTo(0.4185, 4)
    // Searle (1971) F-based interval evaluated in R with qf(): [0.0838361, 0.8478768].
    expect(r.iccCi[0]).toBeCloseTo(0.0838360507, 7)
    expect(r.iccCi[1]).toBeCloseTo(0.8478768155, 7)
    expect(r.varianceBetweenTruncated).toBe(false)
  })

  it('handles unbalanced groups', () => {
    // Invented groups; reference: R 4.x anova(aov(y ~ f)) → MSB 6.380634921, MSW 0.460166667,
    // F 13.865922, p 0.00067769; n0 and interval by the Searle (1971) formula evaluated in R.
    const groups = [
      [12.1, 13.4, 11.8, 12.9],
      [14.2, 15.1, 13.7],
      [11.0, 10.4, 12.2, 11.5, 10.9],
      [13.3, 12.8],
    ]
    const r = oneWayAnova(groups)
    expect(r.msb).toBeCloseTo(6.380634921, 8)
    expect(r.msw).toBeCloseTo(0.460166667, 8)
    expect(r.f).toBeCloseTo(13.865921595, 6)
    expect(r.p).toBeCloseTo(0.000677692, 8)
    expect(r.n0).toBeCloseTo(3.38095238095, 10)
    expect(r.iccCi[0]).toBeCloseTo(0.35654202525, 6)
    expect(r.iccCi[1]).toBeCloseTo(0.983288496, 6)
  })

  it('truncates a negative between-group variance at 0 and says so (Dyestuff2)', () => {
    // Dyestuff2 (Box & Tiao 1973), R anova(aov(Yield ~ Batch, Dyestuff2)): MSB 8.33632576,
    // MSW 14.9458896, F 0.5577671, p 0.7310992; lme4 REML puts σ_batch² at the boundary 0.
    const r = oneWayAnova(dyestuff2Groups)
    expect(r.msb).toBeCloseTo(8.33632576, 7)
    expect(r.msw).toBeCloseTo(14.9458896, 7)
    expect(r.p).toBeCloseTo(0.731099231, 6)
    expect(r.varianceBetweenRaw).toBeLessThan(0)
    expect(r.varianceBetween).toBe(0)
    expect(r.varianceBetweenTruncated).toBe(true)
    expect(r.icc).toBe(0)
    expect(r.iccCi[0]).toBe(0)
    expect(r.iccCi[1]).toBeGreaterThan(0)
  })

  it('gives an interval that covers the true ICC about 95% of the time (balanced normal data)', () => {
    // Common practice, no source: simulation; the F interval is exact for balanced normal data.
    const rng = seedrandom('icc-coverage')
    const normal = () => normalQuantile(Math.min(Math.max(rng(), 1e-12), 1 - 1e-12))
    const trueIcc = 0.3
    const sdB = Math.sqrt(trueIcc)
    const sdW = Math.sqrt(1 - trueIcc)
    let covered = 0
    const runs = 1000
    for (let run = 0; run < runs; run++) {
      const groups: number[][] = []
      for (let g = 0; g < 8; g++) {
        const u = sdB * normal()
        groups.push(Array.from({ length: 6 }, () => u + sdW * normal()))
      }
      const { iccCi } = oneWayAnova(groups)
      if (iccCi[0] <= trueIcc && trueIcc <= iccCi[1]) covered++
    }
    expect(covered / runs).toBeGreaterThan(0.93)
    expect(covered / runs).toBeLessThan(0.97)
  })

  it('reports all variation between groups when every group is constant', () => {
    const r = oneWayAnova([
      [1, 1],
      [3, 3],
    ])
    expect(r.f).toBe(Infinity)
    expect(r.p).toBe(0)
    expect(r.icc).toBe(1)
  })

  it('refuses thin or malformed input with a clear message', () => {
    expect(() => oneWayAnova([[1, 2, 3]])).toThrow(/at least two groups/)
    expect(() => oneWayAnova([])).toThrow(EngineInputError)
    expect(() => oneWayAnova([[1, 2], []])).toThrow(/group 2 has no observations/)
    expect(() => oneWayAnova([[1], [2]])).toThrow(/two or more observations/)
    expect(() =>
      oneWayAnova([
        [1, Number.NaN],
        [2, 3],
      ]),
    ).toThrow(/not a finite number/)
    expect(() =>
      oneWayAnova([
        [1, 2],
        [2, Infinity],
      ]),
    ).toThrow(/not a finite number/)
    expect(() =>
      oneWayAnova([
        [5, 5],
        [5, 5],
      ]),
    ).toThrow(/identical/)
    expect(() =>
      oneWayAnova(
        [
          [1, 2],
          [3, 4],
        ],
        { confidence: 1 },
      ),
    ).toThrow(/confidence/)
    expect(() => oneWayAnova(null as unknown as number[][])).toThrow(/at least two groups/)
  })
})
