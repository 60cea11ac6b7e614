import seedrandom from 'seedrandom'
import { describe, expect, it } from 'vitest'
import { clusterPower } from './cluster-power'
import { threeLevelPower } from './three-level-power'

const example = { labArmVariance: 2, unitVariance: 20, residualVariance: 100, difference: 8 }

describe('threeLevelPower', () => {
  it('reproduces the multisite worked example of WebPower (wp.mrt2arm): power 0.8583253', () => {
    // WebPower documentation, wp.mrt2arm(n = 45, f = 0.5, J = 20, tau11 = 0.5, sg2 = 1.25) → 0.8583253,
    // the Raudenbush & Liu (2000) test: df J − 1, λ = √J·f/√(4/n + τ₁₁/σ²). In our terms a site is a
    // lab, a person a unit with one observation (m = 1), n = 45 persons per site → k = 22.5 per arm,
    // τ₁₁ = 2σ²_lab×arm → σ²_lab×arm = 0.25, and f is in SDs: δ = 0.5·√1.25.
    const r = threeLevelPower({
      labs: 20,
      unitsPerLabArm: 22.5,
      obsPerUnit: 1,
      labArmVariance: 0.25,
      unitVariance: 1.25,
      residualVariance: 0,
      difference: 0.5 * Math.sqrt(1.25),
    })
    expect(r.power).toBeCloseTo(0.8583253, 7)
    expect(r.df).toBe(19)
    // Hand calculation: λ = √20 · 0.5 / √(4/45 + 0.25·2/1.25) = 3.19801.
    expect(r.ncp).toBeCloseTo((Math.sqrt(20) * 0.5) / Math.sqrt(4 / 45 + 0.4), 12)
  })

  it('matches R pt() on the same formula, every-arm and one-arm', () => {
    // R 4.x: v = (2·2 + 2·25/5)/4; λ = 8/√v; power = 1 − pt(qt(.975, 3), 3, λ) + pt(−qt(.975, 3), 3, λ).
    const r = threeLevelPower({ labs: 4, unitsPerLabArm: 5, obsPerUnit: 20, ...example })
    expect(r.variance).toBe(3.5)
    expect(r.power).toBeCloseTo(0.80332345395, 7)
    // Ceiling: λ = 8/√1 with 3 df → 0.998298564674.
    expect(r.ceilingPower).toBeCloseTo(0.998298564674, 7)
    // R 4.x: one arm per lab, 3 labs per arm, v = 2(3 + 1 + (5 + 50/10)/4)/3, df 4, δ 6 → 0.586750545234.
    const oneArm = threeLevelPower({
      design: 'one-arm',
      labs: 3,
      unitsPerLabArm: 4,
      obsPerUnit: 10,
      labVariance: 3,
      labArmVariance: 1,
      unitVariance: 5,
      residualVariance: 50,
      difference: 6,
    })
    expect(oneArm.df).toBe(4)
    expect(oneArm.power).toBeCloseTo(0.586750545234, 7)
    // R 4.x: 6 labs, v = (2·1.5 + 2(4 + 40/8)/3)/6 = 1.5, df 5, α 0.05/3 → 0.27345414852.
    expect(
      threeLevelPower({
        labs: 6,
        unitsPerLabArm: 3,
        obsPerUnit: 8,
        labArmVariance: 1.5,
        unitVariance: 4,
        residualVariance: 40,
        difference: -3,
        alpha: 0.05 / 3,
      }).power,
    ).toBeCloseTo(0.27345414852, 7)
  })

  it('equals the two-level planner with one lab and no lab × arm variance (property, 300 seeded designs)', () => {
    // The one-lab case is clusterPower's formula: σ²_unit = ρσ², σ²_resid = (1 − ρ)σ² (common practice).
    const random = seedrandom('three-level-equals-two-level')
    for (let i = 0; i < 300; i++) {
      const k = 2 + Math.floor(random() * 60)
      const m = 1 + Math.floor(random() * 120)
      const icc = random() * 0.95
      const variance = 0.1 + random() * 50
      const difference = (random() - 0.3) * 6 || 1
      const alpha = [0.05, 0.01, 0.1][i % 3]
      const two = clusterPower({ unitsPerArm: k, obsPerUnit: m, difference, variance, icc, alpha })
      const three = threeLevelPower({
        labs: 1,
        unitsPerLabArm: k,
        obsPerUnit: m,
        labArmVariance: 0,
        unitVariance: icc * variance,
        residualVariance: (1 - icc) * variance,
        difference,
        alpha,
      })
      expect(three.df).toBe(two.df)
      expect(three.ncp).toBeCloseTo(two.ncp, 10)
      expect(three.power, `k ${k}, m ${m}, ρ ${icc}`).toBeCloseTo(two.power, 10)
      expect(three.ceilingPower).toBe(1)
    }
  })

  it('cannot beat the lab × arm variance with more units or observations: only more labs lift the ceiling', () => {
    // Common practice, no source: Var → 2σ²_lab×arm/L as k, m → ∞.
    const wide = { labArmVariance: 8, unitVariance: 20, residualVariance: 100, difference: 6 }
    const four = threeLevelPower({ labs: 4, unitsPerLabArm: 5, obsPerUnit: 20, ...wide })
    const huge = threeLevelPower({ labs: 4, unitsPerLabArm: 1e6, obsPerUnit: 1e4, ...wide })
    expect(four.ceilingPower).toBeLessThan(0.8)
    expect(four.power).toBeLessThan(four.ceilingPower)
    expect(huge.power).toBeLessThanOrEqual(four.ceilingPower + 1e-12)
    expect(huge.power).toBeCloseTo(four.ceilingPower, 4)
    const eight = threeLevelPower({ labs: 8, unitsPerLabArm: 5, obsPerUnit: 20, ...wide })
    expect(eight.ceilingPower).toBeGreaterThan(four.ceilingPower)
    expect(eight.power).toBeGreaterThan(four.power)
  })

  it('refuses impossible inputs', () => {
    const ok = { labs: 4, unitsPerLabArm: 5, obsPerUnit: 20, ...example }
    expect(() => threeLevelPower({ ...ok, difference: 0 })).toThrow(/non-zero number/)
    expect(() => threeLevelPower({ ...ok, alpha: 0 })).toThrow(/alpha/)
    expect(() => threeLevelPower({ ...ok, labs: 1 })).toThrow(/with one lab/)
    expect(() => threeLevelPower(undefined as never)).toThrow(/non-zero number/)
  })
})
