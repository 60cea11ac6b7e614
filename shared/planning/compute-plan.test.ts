import { describe, expect, it } from 'vitest'
import { PlanInputs } from '../schemas/plans'
import { computePlan } from './compute-plan'
import { resolveSpread } from './resolve-spread'

describe('computePlan', () => {
  it('reproduces the clusterPower worked example when observations per unit are capped at 10', () => {
    // R package clusterPower, crtpwr.2mean documentation: m = 10, d = 1, ICC 0.1, σ² = 5, α 0.05,
    // power 0.8 → 15.93 clusters per arm (the continuous value is checked in
    // shared/stats/units-needed.test.ts); whole units: 16.
    const plan = computePlan(
      PlanInputs.parse({
        icc: 0.1,
        spread: { kind: 'total', sdTotal: Math.sqrt(5) },
        difference: 1,
        costPerUnit: 1000,
        costPerObs: 1,
        maxObsPerUnit: 10,
      }),
    )
    expect([plan.unitsPerArm, plan.obsPerUnit]).toEqual([16, 10])
    expect(plan.table.find((r) => r.recommended)).toMatchObject({ unitsPerArm: 16, obsPerUnit: 10 })
    expect(plan.table.find((r) => r.unitsPerArm === 15 && r.obsPerUnit === 10)!.power).toBeLessThan(0.8)
  })

  it('turns SDs between and within units into ICC and total SD', () => {
    // Common practice, no source: ICC = σ_b² / (σ_b² + σ_w²).
    const spread = resolveSpread(
      PlanInputs.parse({
        icc: 0.9,
        spread: { kind: 'components', sdBetween: 3, sdWithin: 4 },
        difference: 1,
        costPerUnit: 1,
        costPerObs: 1,
      }),
    )
    expect(spread.icc).toBeCloseTo(9 / 25, 15)
    expect(spread.sdTotal).toBeCloseTo(5, 15)
  })

  it('shows effective observations per unit levelling off at 1/ICC', () => {
    // Kish design effect 1 + (m − 1)ρ: m / deff → 1/ρ as m grows (common practice).
    const plan = computePlan(
      PlanInputs.parse({
        icc: 0.25,
        spread: { kind: 'total', sdTotal: 1 },
        difference: 0.5,
        costPerUnit: 50,
        costPerObs: 1,
      }),
    )
    const effective = plan.obsCurve.map((p) => p.effectivePerUnit)
    expect(effective.every((v, i) => i === 0 || v > effective[i - 1])).toBe(true)
    expect(effective.at(-1)!).toBeLessThan(4)
    expect(plan.mStar).toBeCloseTo(Math.sqrt(50 * 3), 12)
  })
})
