import { describe, expect, it } from 'vitest'
import { PlanInputs, PlanResult, PlanSummary, SINGLE_LAB } from '../schemas/plans'
import { planFewestUnits } from '../stats/plan-fewest-units'
import { planThreeLevel } from '../stats/plan-three-level'
import { threeLevelPower } from '../stats/three-level-power'
import { computePlan } from './compute-plan'
import stored from './fixtures/plan-before-labs.json'
import { resolveSpread } from './resolve-spread'

/** Invented three-lab numbers: SD 11 inside a lab and arm (ICC 1/6), the effect differs by SD 2 between labs. */
const consortium = {
  icc: 20 / 120,
  spread: { kind: 'total', sdTotal: Math.sqrt(120) },
  difference: 8,
  costPerUnit: 100,
  costPerObs: 1,
  outer: { name: 'lab', minLabs: 2, maxLabs: 12, costPerLab: 2000, effectSd: 2 },
} as const

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
    expect([plan.labs, plan.unitsPerArm, plan.obsPerUnit]).toEqual([1, 16, 10])
    expect(plan.table.find((r) => r.recommended)).toMatchObject({ labs: 1, unitsPerArm: 16, obsPerUnit: 10 })
    expect(plan.table.find((r) => r.unitsPerArm === 15 && r.obsPerUnit === 10)!.power).toBeLessThan(0.8)
    expect(plan.labCurves).toEqual([])
    expect(plan.df).toBe(30)
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

  it('reads a plan saved before the outer level existed, and recomputes it to the same answer', () => {
    // Fixture: inputs and result as the planner of commit ca30a43 stored them (no outer level).
    const inputs = PlanInputs.parse(stored.inputs)
    expect(inputs.outer).toEqual(SINGLE_LAB)
    const result = PlanResult.parse(stored.result)
    expect(result).toMatchObject({
      labs: 1,
      totalLabs: 1,
      design: 'every-arm',
      ceilingPower: 1,
      labCurves: [],
    })
    expect(result.table.every((row) => row.labs === 1)).toBe(true)
    const summary = PlanSummary.parse({
      name: 'old',
      createdAt: '2026-01-01T00:00:00Z',
      inputs: stored.inputs,
      result: stored.result,
    })
    expect(summary.result.labs).toBe(1)
    const again = computePlan(inputs)
    expect([again.unitsPerArm, again.obsPerUnit, again.cost]).toEqual([
      stored.result.unitsPerArm,
      stored.result.obsPerUnit,
      stored.result.cost,
    ])
    // The stored power came from jStat's t quantile, about 3e-8 off R's qt; ours matches R.
    expect(Math.abs(again.power - stored.result.power)).toBeLessThan(1e-7)
  })

  it('plans labs, units per lab and observations per unit from the effect SD between labs', () => {
    const inputs = PlanInputs.parse(consortium)
    const plan = computePlan(inputs)
    // σ²_lab×arm = SD²/2 = 2: the same numbers straight into the engine's planner.
    const direct = planThreeLevel({
      labArmVariance: 2,
      unitVariance: 20,
      residualVariance: 100,
      difference: 8,
      minLabs: 2,
      maxLabs: 12,
      costPerLab: 2000,
      costPerUnit: 100,
      costPerObs: 1,
    })
    expect([plan.labs, plan.unitsPerArm, plan.obsPerUnit, plan.cost]).toEqual([
      direct.labs,
      direct.unitsPerLabArm,
      direct.obsPerUnit,
      direct.cost,
    ])
    expect(plan.labArmVariance).toBeCloseTo(2, 12)
    expect(plan.labArmVarianceAssumed).toBe(false)
    expect(plan.df).toBe(plan.labs - 1)
    // The labs chart: each curve stays under its ceiling, and the recommended labs' curve passes
    // through the recommendation (common practice, no source).
    expect(plan.labCurves.length).toBeGreaterThanOrEqual(3)
    for (const curve of plan.labCurves) {
      for (const p of curve.byUnits) expect(p.power).toBeLessThanOrEqual(curve.ceilingPower + 1e-12)
      for (const p of curve.byObs) expect(p.power).toBeLessThanOrEqual(curve.ceilingPower + 1e-12)
    }
    const own = plan.labCurves.find((c) => c.labs === plan.labs)!
    expect(own.byUnits.find((p) => p.unitsPerArm === plan.unitsPerArm)!.power).toBeCloseTo(plan.power, 12)
    expect(own.ceilingPower).toBeCloseTo(plan.ceilingPower, 12)
    const ceilings = plan.labCurves.map((c) => c.ceilingPower)
    expect(ceilings.every((c, i) => i === 0 || c > ceilings[i - 1])).toBe(true)
    expect(plan.table.find((r) => r.recommended)).toMatchObject({ labs: plan.labs })
    expect(plan.table.some((r) => r.labs === plan.labs + 1)).toBe(true)
  })

  it('draws the number of labs whose ceiling stays below the target when the effect differs a lot between labs', () => {
    const plan = computePlan(
      PlanInputs.parse({ ...consortium, difference: 6, outer: { ...consortium.outer, effectSd: 4 } }),
    )
    expect(plan.fewestLabs).not.toBeNull()
    const below = plan.labCurves.find((c) => c.labs === plan.fewestLabs! - 1)!
    expect(below.ceilingPower).toBeLessThan(0.8)
    // The ceiling is the power as units and observations grow without bound (common practice, no source).
    const far = threeLevelPower({
      labs: below.labs,
      unitsPerLabArm: 1e9,
      obsPerUnit: 1e6,
      labArmVariance: 8,
      unitVariance: 20,
      residualVariance: 100,
      difference: 6,
    })
    expect(below.ceilingPower).toBeCloseTo(far.power, 6)
  })

  it('plans an unknown effect SD between labs as 0 and says so', () => {
    const unknown = computePlan(
      PlanInputs.parse({ ...consortium, outer: { ...consortium.outer, effectSd: null } }),
    )
    const zero = computePlan(PlanInputs.parse({ ...consortium, outer: { ...consortium.outer, effectSd: 0 } }))
    expect(unknown.labArmVarianceAssumed).toBe(true)
    expect(zero.labArmVarianceAssumed).toBe(false)
    expect([unknown.labs, unknown.unitsPerArm, unknown.obsPerUnit]).toEqual([
      zero.labs,
      zero.unitsPerArm,
      zero.obsPerUnit,
    ])
    expect(unknown.ceilingPower).toBe(1)
  })

  it('plans one arm per lab, and leaves the effect SD out of a plan for one lab', () => {
    const oneArm = computePlan(
      PlanInputs.parse({
        ...consortium,
        difference: 10,
        outer: {
          name: 'plate',
          design: 'one-arm',
          minLabs: 2,
          maxLabs: 10,
          costPerLab: 200,
          sdBetweenLabs: 2,
        },
      }),
    )
    expect(oneArm.design).toBe('one-arm')
    expect(oneArm.totalLabs).toBe(2 * oneArm.labs)
    expect(oneArm.df).toBe(2 * (oneArm.labs - 1))
    expect(oneArm.labArmVariance).toBeCloseTo(4, 12)
    const single = computePlan(
      PlanInputs.parse({ ...consortium, outer: { ...consortium.outer, minLabs: 1, maxLabs: 1 } }),
    )
    expect(single.labs).toBe(1)
    expect(single.labArmVariance).toBe(0)
    expect(single.notes.join(' ')).toMatch(/the plan is for this lab alone/)
  })

  it('without costs counts: the fewest units, then the fewest observations, and no cost anywhere', () => {
    const inputs = PlanInputs.parse({
      icc: 20 / 120,
      spread: { kind: 'total', sdTotal: Math.sqrt(120) },
      difference: 8,
    })
    expect([inputs.costPerUnit, inputs.costPerObs, inputs.outer.costPerLab]).toEqual([null, null, null])
    const plan = computePlan(inputs)
    // The same numbers straight into the engine's count-based search.
    const direct = planFewestUnits({
      labArmVariance: 0,
      unitVariance: 20,
      residualVariance: 100,
      difference: 8,
      minLabs: 1,
      maxLabs: 1,
    })
    expect([plan.unitsPerArm, plan.obsPerUnit]).toEqual([direct.unitsPerLabArm, direct.obsPerUnit])
    expect(plan).toMatchObject({ objective: 'counts', cost: null, mStar: null, kStar: null })
    expect(plan.table.every((row) => row.cost === null)).toBe(true)
    // Each row: more units, the fewest observations that reach the target with them.
    const rows = plan.table.filter((r) => r.labs === 1)
    expect(rows[0]).toMatchObject({
      unitsPerArm: plan.unitsPerArm,
      obsPerUnit: plan.obsPerUnit,
      recommended: true,
    })
    for (const row of rows) {
      expect(row.power).toBeGreaterThanOrEqual(0.8)
      if (row.obsPerUnit > 1) {
        const fewer = threeLevelPower({
          labs: 1,
          unitsPerLabArm: row.unitsPerArm,
          obsPerUnit: row.obsPerUnit - 1,
          labArmVariance: 0,
          unitVariance: 20,
          residualVariance: 100,
          difference: 8,
        })
        expect(fewer.power).toBeLessThan(0.8)
      }
    }
    expect(rows.map((r) => r.obsPerUnit)).toEqual([...rows.map((r) => r.obsPerUnit)].sort((a, b) => b - a))
    expect(PlanResult.parse(plan).objective).toBe('counts')
  })

  it('refuses a cost per lab alone, and a zero cost per unit and observation', () => {
    const base = { icc: 0.2, spread: { kind: 'total', sdTotal: 10 }, difference: 5 } as const
    expect(PlanInputs.safeParse({ ...base, outer: { costPerLab: 500 } }).success).toBe(false)
    expect(PlanInputs.safeParse({ ...base, costPerUnit: 0, costPerObs: 0 }).success).toBe(false)
    expect(PlanInputs.safeParse({ ...base, costPerUnit: 0 }).success).toBe(false)
    expect(PlanInputs.safeParse({ ...base, costPerObs: 2 }).success).toBe(true)
  })

  it('reads a result stored with costs as a cost plan', () => {
    expect(PlanResult.parse(stored.result).objective).toBe('cost')
  })
})
