import { describe, expect, it } from 'vitest'
import { clusterPower } from './cluster-power'
import { EngineInputError } from './engine-input-error'

describe('clusterPower', () => {
  it('matches the two-sided noncentral t power computed with R pt()', () => {
    // Reference: R 4.x, power = pt(tc, df, ncp, lower = FALSE) + pt(-tc, df, ncp) with the same
    // formula; the first case is the clusterPower crtpwr.2mean documentation example at k = 16.
    const r = clusterPower({ unitsPerArm: 16, obsPerUnit: 10, difference: 1, variance: 5, icc: 0.1 })
    expect(r.power).toBeCloseTo(0.80176692786, 7)
    expect(r.deff).toBeCloseTo(1.9, 12)
    expect(r.df).toBe(30)
    expect(r.ncp).toBeCloseTo(2.90190500044, 9)
    expect(r.tCritical).toBeCloseTo(2.0422724563, 7)
    expect(
      clusterPower({ unitsPerArm: 5, obsPerUnit: 20, difference: -0.8, variance: 2, icc: 0.25, alpha: 0.01 })
        .power,
    ).toBeCloseTo(0.10975151669, 7)
    expect(
      clusterPower({ unitsPerArm: 40, obsPerUnit: 3, difference: 0.3, sdTotal: 1, icc: 0.05 }).power,
    ).toBeCloseTo(0.590328491164, 7)
    expect(
      clusterPower({ unitsPerArm: 2.5, obsPerUnit: 4, difference: 1, variance: 1, icc: 0.2 }).power,
    ).toBeCloseTo(0.238763460092, 7)
  })

  it('stays right at large noncentrality with few degrees of freedom', () => {
    // R 4.x: k = 2, m = 900, ρ = 0, δ/σ = 1, α = 0.002 → 0.834734499224 (plain jStat would say 1).
    expect(
      clusterPower({ unitsPerArm: 2, obsPerUnit: 900, difference: 1, variance: 1, icc: 0, alpha: 0.002 })
        .power,
    ).toBeCloseTo(0.834734499224, 8)
  })

  it('gives power α for a vanishing difference and rises with units and observations', () => {
    // Common practice, no source: monotonicity and the limit δ → 0.
    expect(
      clusterPower({ unitsPerArm: 6, obsPerUnit: 5, difference: 1e-9, variance: 1, icc: 0.1 }).power,
    ).toBeCloseTo(0.05, 6)
    const base = { obsPerUnit: 10, difference: 0.5, variance: 1, icc: 0.2 }
    expect(clusterPower({ ...base, unitsPerArm: 10 }).power).toBeGreaterThan(
      clusterPower({ ...base, unitsPerArm: 8 }).power,
    )
    expect(clusterPower({ ...base, unitsPerArm: 8, obsPerUnit: 20 }).power).toBeGreaterThan(
      clusterPower({ ...base, unitsPerArm: 8 }).power,
    )
  })

  it('refuses impossible designs with a clear message', () => {
    const ok = { unitsPerArm: 5, obsPerUnit: 10, difference: 1, variance: 1, icc: 0.1 }
    expect(() => clusterPower({ ...ok, unitsPerArm: 1.5 })).toThrow(/at least two units per arm/)
    expect(() => clusterPower({ ...ok, obsPerUnit: 0 })).toThrow(/at least one observation per unit/)
    expect(() => clusterPower({ ...ok, difference: 0 })).toThrow(/non-zero number/)
    expect(() => clusterPower({ ...ok, icc: 1.2 })).toThrow(/icc must be between 0 and 1/)
    expect(() => clusterPower({ ...ok, alpha: 0 })).toThrow(/alpha/)
    expect(() => clusterPower({ ...ok, variance: undefined })).toThrow(/exactly one of sdTotal or variance/)
    expect(() => clusterPower(undefined as never)).toThrow(EngineInputError)
  })
})
