import { describe, expect, it } from 'vitest'
import { welchTest } from './welch-test'

// R's `sleep` data (Cushny & Peebles 1905, as analysed by Student 1908), summarised per group:
// group 1 mean 0.75, variance 3.2005556; group 2 mean 2.33, variance 4.009.
const group1 = { n: 10, mean: 0.75, variance: 3.20055555556 }
const group2 = { n: 10, mean: 2.33, variance: 4.009 }

describe('welchTest', () => {
  it('matches R t.test(extra ~ group, data = sleep)', () => {
    // R 4.x: t = -1.860813467, df = 17.77647352, p-value = 0.0793941402, stderr 0.8490910172.
    const r = welchTest(group1, group2)
    expect(r.t).toBeCloseTo(-1.860813467, 7)
    expect(r.df).toBeCloseTo(17.77647352, 6)
    expect(r.p).toBeCloseTo(0.0793941402, 7)
    expect(r.se).toBeCloseTo(0.8490910172, 8)
    expect(r.diff).toBeCloseTo(-1.58, 12)
  })

  it('keeps the digits of a tiny p-value (two cohorts of 100, far apart)', () => {
    // R 4.2.2: t.test(a, b) with a, b of 100 values each, rescaled to means 11.2 and 8.08 and
    // variances 4 (set.seed(1); rnorm): t = 11.030865786510139, df = 198, p-value = 2.3033758663278346e-22.
    const r = welchTest({ n: 100, mean: 11.2, variance: 4 }, { n: 100, mean: 8.08, variance: 4 })
    expect(r.t).toBeCloseTo(11.030865786510139, 10)
    expect(r.df).toBeCloseTo(198, 10)
    expect(Math.abs(r.p / 2.3033758663278346e-22 - 1)).toBeLessThan(1e-10)
  })

  it('is antisymmetric in its arguments', () => {
    const ab = welchTest(group1, group2)
    const ba = welchTest(group2, group1)
    expect(ba.t).toBeCloseTo(-ab.t, 12)
    expect(ba.p).toBeCloseTo(ab.p, 12)
  })

  it('handles one group without spread', () => {
    // Welch–Satterthwaite df collapse to n − 1 of the group that has variance (common practice).
    const r = welchTest({ n: 5, mean: 1, variance: 0 }, { n: 8, mean: 2, variance: 2 })
    expect(r.df).toBeCloseTo(7, 12)
  })

  it('refuses thin or malformed summaries', () => {
    expect(() => welchTest({ n: 1, mean: 1, variance: 1 }, group2)).toThrow(
      /at least two observations in the first group/,
    )
    expect(() => welchTest(group1, { n: 2.5, mean: 1, variance: 1 })).toThrow(/second group/)
    expect(() => welchTest({ n: 3, mean: Number.NaN, variance: 1 }, group2)).toThrow(
      /mean of the first group/,
    )
    expect(() => welchTest(group1, { n: 3, mean: 1, variance: -1 })).toThrow(/variance of the second group/)
    expect(() => welchTest({ n: 3, mean: 1, variance: 0 }, { n: 3, mean: 2, variance: 0 })).toThrow(
      /zero variance/,
    )
    expect(() => welchTest(undefined as never, group2)).toThrow(/first group/)
  })
})
