import { describe, expect, it } from 'vitest'
import { costOptimalUnitsPerLab } from './cost-optimal-units-per-lab'

const base = {
  costPerLab: 2000,
  costPerUnit: 100,
  costPerObs: 1,
  obsPerUnit: 20,
  labArmVariance: 2,
  unitVariance: 20,
  residualVariance: 100,
}

describe('costOptimalUnitsPerLab', () => {
  it('gives k* = √(c_lab·w / (arms·c₁·σ²_lab×arm))', () => {
    // Hand calculation: w = 20 + 100/20 = 25, c₁ = 100 + 20 = 120: √(2000·25/(2·120·2)) = √104.1667.
    const r = costOptimalUnitsPerLab(base)
    expect(r.exact).toBeCloseTo(Math.sqrt(104.16666666666667), 12)
    expect(r.unitsPerLabArm).toBe(10)
    expect(r.note).toBeNull()
  })

  it("is Raudenbush & Liu's optimal persons per site n* = 2√(C·σ²/(c·τ)) with n = 2k (from memory)", () => {
    // Two arms, m = 1: C = c_lab, c = c_unit + c_obs, σ² = σ²_unit + σ²_resid, τ = 2σ²_lab×arm.
    const r = costOptimalUnitsPerLab({ ...base, obsPerUnit: 1, labArmVariance: 0.25 })
    const n = 2 * Math.sqrt((2000 * 120) / (101 * 0.5))
    expect(2 * r.exact).toBeCloseTo(n, 10)
  })

  it('minimises cost × variance, and picks the better whole number (common practice, no source)', () => {
    for (const design of ['every-arm', 'one-arm'] as const) {
      const input = { ...base, design, arms: 3, labVariance: 5 }
      const perLab = design === 'every-arm' ? 3 : 1
      const between = design === 'every-arm' ? 2 : 7
      const criterion = (k: number) => (2000 + perLab * k * 120) * (between + 25 / k)
      let whole = 1
      for (let k = 1; k <= 500; k++) if (criterion(k) < criterion(whole)) whole = k
      const r = costOptimalUnitsPerLab(input)
      expect(r.unitsPerLabArm).toBe(whole)
      expect(criterion(r.exact)).toBeLessThanOrEqual(criterion(r.exact * 1.01))
      expect(criterion(r.exact)).toBeLessThanOrEqual(criterion(r.exact * 0.99))
    }
  })

  it('leaves the optimal m inside a unit where the two-level result puts it (brute force, common practice)', () => {
    // Minimise (c_lab + 2k(c_unit + m·c_obs))(2σ²_lab×arm + 2(σ²_unit + σ²_resid/m)/k) over a fine
    // grid of k and whole m: the best m is next to m* = √((100/1)·(100/20)) = √500 = 22.36.
    let best = { m: 0, value: Infinity }
    for (let m = 1; m <= 80; m++) {
      for (let k = 0.25; k <= 60; k += 0.25) {
        const value = (2000 + 2 * k * (100 + m)) * (2 * 2 + (2 * (20 + 100 / m)) / k)
        if (value < best.value) best = { m, value }
      }
    }
    expect([22, 23]).toContain(best.m)
  })

  it('explains the edge cases', () => {
    const none = costOptimalUnitsPerLab({ ...base, labArmVariance: 0 })
    expect(none).toMatchObject({ exact: Infinity, unitsPerLabArm: null })
    expect(none.note).toMatch(/no finite optimum/)
    expect(costOptimalUnitsPerLab({ ...base, costPerLab: 0 })).toMatchObject({ exact: 0, unitsPerLabArm: 1 })
    expect(costOptimalUnitsPerLab({ ...base, costPerUnit: 0, costPerObs: 0 }).note).toMatch(/cost nothing/)
    expect(costOptimalUnitsPerLab({ ...base, unitVariance: 0, residualVariance: 0 }).unitsPerLabArm).toBe(1)
  })

  it('refuses malformed input', () => {
    expect(() => costOptimalUnitsPerLab({ ...base, costPerLab: -1 })).toThrow(/costPerLab must be/)
    expect(() => costOptimalUnitsPerLab({ ...base, costPerLab: 0, costPerUnit: 0, costPerObs: 0 })).toThrow(
      /at least one non-zero cost/,
    )
    expect(() => costOptimalUnitsPerLab({ ...base, obsPerUnit: 0 })).toThrow(/at least one observation/)
    expect(() => costOptimalUnitsPerLab({ ...base, labArmVariance: -2 })).toThrow(/labArmVariance/)
    expect(() => costOptimalUnitsPerLab({ ...base, arms: 1 })).toThrow(/two arms/)
    expect(() => costOptimalUnitsPerLab({ ...base, design: 'x' as never })).toThrow(/unknown design/)
  })
})
