import { describe, expect, it } from 'vitest'
import { EngineInputError } from './engine-input-error'
import { holmAdjust } from './holm-adjust'

describe('holmAdjust', () => {
  it("matches R's p.adjust(method = 'holm')", () => {
    // R 4.x: p.adjust(c(0.004392633, 7.906483e-05, 0.02107914), "holm") = 0.008785265 0.0002371945 0.02107914
    const r = holmAdjust([0.004392633, 7.906483e-5, 0.02107914])
    expect(r[0]).toBeCloseTo(0.008785266, 9)
    expect(r[1]).toBeCloseTo(0.0002371945, 10)
    expect(r[2]).toBeCloseTo(0.02107914, 9)
  })

  it('keeps the step-down monotone and caps at 1', () => {
    // Holm 1979: adjusted values are non-decreasing in the order of the raw p-values.
    // R: p.adjust(c(0.01, 0.04, 0.03, 0.5), "holm") = 0.04 0.09 0.09 0.50
    const r = holmAdjust([0.01, 0.04, 0.03, 0.5])
    expect(r.map((v) => +v.toFixed(10))).toEqual([0.04, 0.09, 0.09, 0.5])
    expect(holmAdjust([0.6, 0.7])).toEqual([1, 1])
    expect(holmAdjust([])).toEqual([])
  })

  it('rejects values that are not p-values', () => {
    expect(() => holmAdjust([0.1, NaN])).toThrow(EngineInputError)
    expect(() => holmAdjust([1.2])).toThrow(/in \[0, 1\]/)
  })
})
