import { describe, expect, it } from 'vitest'
import { unitsNeeded } from './units-needed'
import { clusterPower } from './cluster-power'

describe('unitsNeeded', () => {
  it('reproduces the clusterPower crtpwr.2mean documentation example (15.93 → 16 per arm)', () => {
    // Documentation of the R package clusterPower, crtpwr.2mean: m = 10, d = 1, ICC 0.1,
    // σ² = 5, α 0.05, power 0.8 → 15.93 clusters per arm. Our two-sided root: 15.932747
    // (R uniroot on the same two-sided formula: 15.93274688).
    const r = unitsNeeded({ obsPerUnit: 10, difference: 1, variance: 5, icc: 0.1, alpha: 0.05, power: 0.8 })
    expect(r.exact).toBeCloseTo(15.93, 2)
    expect(r.exact).toBeCloseTo(15.93274688, 5)
    expect(r.unitsPerArm).toBe(16)
    expect(r.achievedPower).toBeGreaterThanOrEqual(0.8)
    expect(r.atMinimum).toBe(false)
  })

  it('returns the smallest whole number that reaches the target', () => {
    // Common practice, no source: k − 1 units must fall short of the target.
    const input = { obsPerUnit: 25, difference: 0.4, sdTotal: 1.3, icc: 0.15, power: 0.9 }
    const r = unitsNeeded(input)
    expect(clusterPower({ ...input, unitsPerArm: r.unitsPerArm }).power).toBeGreaterThanOrEqual(0.9)
    expect(clusterPower({ ...input, unitsPerArm: r.unitsPerArm - 1 }).power).toBeLessThan(0.9)
    expect(Math.abs(clusterPower({ ...input, unitsPerArm: r.exact }).power - 0.9)).toBeLessThan(1e-8)
  })

  it('reports the two-unit minimum when even that is more than enough', () => {
    const r = unitsNeeded({ obsPerUnit: 100, difference: 3, variance: 1, icc: 0 })
    expect(r).toMatchObject({ exact: 2, unitsPerArm: 2, atMinimum: true })
  })

  it('refuses impossible targets and inputs', () => {
    const ok = { obsPerUnit: 10, difference: 1, variance: 5, icc: 0.1 }
    expect(() => unitsNeeded({ ...ok, power: 1 })).toThrow(/target power must be between alpha/)
    expect(() => unitsNeeded({ ...ok, power: 0.01 })).toThrow(/target power/)
    expect(() => unitsNeeded({ ...ok, difference: 0 })).toThrow(/non-zero/)
    expect(() => unitsNeeded({ ...ok, icc: -1 })).toThrow(/icc/)
    expect(() => unitsNeeded({ ...ok, difference: 1e-6, icc: 1, power: 0.99 })).toThrow(
      /more than 10 million units/,
    )
  })
})
