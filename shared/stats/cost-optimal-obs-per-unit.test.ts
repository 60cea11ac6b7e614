import { describe, expect, it } from 'vitest'
import { costOptimalObsPerUnit } from './cost-optimal-obs-per-unit'

describe('costOptimalObsPerUnit', () => {
  it('gives m* = √((c_unit / c_obs)(1 − ρ)/ρ)', () => {
    // Raudenbush (1997) formula evaluated by hand: √(100 · 0.9 / 0.1) = 30.
    expect(costOptimalObsPerUnit({ costPerUnit: 100, costPerObs: 1, icc: 0.1 })).toEqual({
      exact: 30,
      obsPerUnit: 30,
      note: null,
    })
    // √(50/2 · 0.75/0.25) = √75 = 8.660
    const r = costOptimalObsPerUnit({ costPerUnit: 50, costPerObs: 2, icc: 0.25 })
    expect(r.exact).toBeCloseTo(Math.sqrt(75), 12)
  })

  it('picks the whole number that minimises cost × variance, and m* minimises the continuous criterion', () => {
    // Common practice, no source: brute-force minimisation of (c_u + m c_o)(1 + (m − 1)ρ)/m.
    const input = { costPerUnit: 50, costPerObs: 2, icc: 0.25 }
    const criterion = (m: number) => ((50 + 2 * m) * (1 + (m - 1) * 0.25)) / m
    let bestWhole = 1
    for (let m = 1; m <= 100; m++) if (criterion(m) < criterion(bestWhole)) bestWhole = m
    const r = costOptimalObsPerUnit(input)
    expect(r.obsPerUnit).toBe(bestWhole)
    expect(criterion(r.exact)).toBeLessThanOrEqual(criterion(r.exact * 1.01))
    expect(criterion(r.exact)).toBeLessThanOrEqual(criterion(r.exact * 0.99))
  })

  it('explains the edge cases instead of dividing by zero', () => {
    const none = costOptimalObsPerUnit({ costPerUnit: 100, costPerObs: 1, icc: 0 })
    expect(none.exact).toBe(Infinity)
    expect(none.obsPerUnit).toBeNull()
    expect(none.note).toMatch(/no finite optimum/)
    expect(costOptimalObsPerUnit({ costPerUnit: 100, costPerObs: 0, icc: 0.2 }).note).toMatch(/cost nothing/)
    expect(costOptimalObsPerUnit({ costPerUnit: 100, costPerObs: 1, icc: 1 })).toMatchObject({
      exact: 0,
      obsPerUnit: 1,
    })
    expect(costOptimalObsPerUnit({ costPerUnit: 0, costPerObs: 1, icc: 0.2 })).toMatchObject({
      obsPerUnit: 1,
    })
    expect(costOptimalObsPerUnit({ costPerUnit: 1, costPerObs: 1000, icc: 0.9 }).obsPerUnit).toBe(1)
  })

  it('refuses malformed input', () => {
    expect(() => costOptimalObsPerUnit({ costPerUnit: -1, costPerObs: 1, icc: 0.1 })).toThrow(
      /costPerUnit must be a non-negative number/,
    )
    expect(() => costOptimalObsPerUnit({ costPerUnit: 1, costPerObs: Number.NaN, icc: 0.1 })).toThrow(
      /costPerObs/,
    )
    expect(() => costOptimalObsPerUnit({ costPerUnit: 0, costPerObs: 0, icc: 0.1 })).toThrow(
      /at least one non-zero cost/,
    )
    expect(() => costOptimalObsPerUnit({ costPerUnit: 1, costPerObs: 1, icc: 2 })).toThrow(
      /icc must be between 0 and 1/,
    )
  })
})
