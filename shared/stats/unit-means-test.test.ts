import { describe, expect, it } from 'vitest'
import { unitMeansTest } from './unit-means-test'
import { EngineInputError } from './engine-input-error'

// R's `sleep` data (Cushny & Peebles 1905) and `PlantGrowth` data (Dobson 1983), used here as
// stand-ins for unit means.
const sleep1 = [0.7, -1.6, -0.2, -1.2, -0.1, 3.4, 3.7, 0.8, 0.0, 2.0]
const sleep2 = [1.9, 0.8, 1.1, 0.1, -0.1, 4.4, 5.5, 1.6, 4.6, 3.4]
const ctrl = [4.17, 5.58, 5.18, 6.11, 4.5, 4.61, 5.17, 4.53, 5.33, 5.14]
const trt1 = [4.81, 4.17, 4.41, 3.59, 5.87, 3.83, 6.03, 4.89, 4.32, 4.69]
const trt2 = [6.31, 5.12, 5.54, 5.5, 5.37, 5.29, 4.92, 6.15, 5.8, 5.26]

describe('unitMeansTest', () => {
  it('runs a pooled t-test for two conditions, matching R t.test(var.equal = TRUE)', () => {
    // R 4.x t.test(extra ~ group, data = sleep, var.equal = TRUE):
    // t = -1.860813467, df = 18, p-value = 0.0791867142, stderr 0.8490910172.
    const r = unitMeansTest([sleep1, sleep2])
    expect(r.method).toBe('student-t')
    expect(r.t).toBeCloseTo(-1.860813467, 7)
    expect(r.df).toBe(18)
    expect(r.p).toBeCloseTo(0.0791867142, 7)
    expect(r.se).toBeCloseTo(0.8490910172, 8)
    expect(r.diff).toBeCloseTo(-1.58, 12)
    expect(r.f).toBeCloseTo(1.860813467 ** 2, 6)
    expect(r.df1).toBe(1)
    expect(r.df2).toBe(18)
  })

  it('runs a one-way ANOVA for three conditions, matching R oneway.test(var.equal = TRUE)', () => {
    // R 4.x oneway.test(weight ~ group, PlantGrowth, var.equal = TRUE):
    // F = 4.846087862, num df = 2, denom df = 27, p-value = 0.0159099583.
    const r = unitMeansTest([ctrl, trt1, trt2])
    expect(r.method).toBe('one-way-anova')
    expect(r.f).toBeCloseTo(4.846087862, 7)
    expect(r.df1).toBe(2)
    expect(r.df2).toBe(27)
    expect(r.p).toBeCloseTo(0.0159099583, 8)
    expect(r.t).toBeUndefined()
  })

  it('refuses thin or malformed input with a clear message', () => {
    expect(() => unitMeansTest([sleep1])).toThrow(/at least two conditions/)
    expect(() => unitMeansTest([sleep1, []])).toThrow(/condition 2 has no unit means/)
    expect(() => unitMeansTest([[1], [2]])).toThrow(/one unit per condition/)
    expect(() =>
      unitMeansTest([
        [1, 2],
        [Number.NaN, 3],
      ]),
    ).toThrow(/condition 2 contains a value that is not a finite number/)
    expect(() =>
      unitMeansTest([
        [1, 1],
        [2, 2],
      ]),
    ).toThrow(/do not vary within any condition/)
    expect(() =>
      unitMeansTest([
        [1, 1],
        [1, 1],
      ]),
    ).toThrow(EngineInputError)
  })
})
