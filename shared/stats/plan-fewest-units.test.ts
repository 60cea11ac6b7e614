import { describe, expect, it } from 'vitest'
import { clusterPower } from './cluster-power'
import { COUNTS_OBS_CAP, planFewestUnits, type PlanFewestUnitsInput } from './plan-fewest-units'
import { threeLevelPower } from './three-level-power'

const oneLab = {
  labArmVariance: 0,
  unitVariance: 20,
  residualVariance: 100,
  difference: 8,
  minLabs: 1,
  maxLabs: 1,
}

/**
 * Exhaustive search, the slow way, to check the fast one (common practice, no source): the fewest
 * units in all (ties: fewer labs), then the fewest observations per unit for them.
 */
function bruteForce(input: PlanFewestUnitsInput, maxObs: number, maxUnits = 200) {
  const design = input.design ?? 'every-arm'
  const arms = input.arms ?? 2
  const alpha = (input.alpha ?? 0.05) / ((arms * (arms - 1)) / 2)
  const target = input.power ?? 0.8
  let best: { labs: number; k: number; m: number } | null = null
  for (let labs = input.minLabs; labs <= input.maxLabs; labs++) {
    if (labs === 1 && (design === 'one-arm' || input.labArmVariance > 0)) continue
    for (let k = labs === 1 ? 2 : 1; k <= maxUnits; k++) {
      if (best && labs * k >= best.labs * best.k) break
      for (let m = 1; m <= maxObs; m++) {
        const power = threeLevelPower({
          ...input,
          design,
          labs,
          unitsPerLabArm: k,
          obsPerUnit: m,
          alpha,
        }).power
        if (power >= target) {
          best = { labs, k, m }
          break
        }
      }
    }
  }
  return best
}

describe('planFewestUnits', () => {
  it('matches the documented example', () => {
    const plan = planFewestUnits(oneLab)
    expect(plan).toMatchObject({
      feasible: true,
      labs: 1,
      unitsPerLabArm: 7,
      obsPerUnit: 25,
      totalUnits: 14,
      df: 12,
    })
    expect(plan.achievedPower).toBeCloseTo(0.8006, 4)
  })

  it('with one lab is the two-level cluster test: the fewest units, then the fewest observations', () => {
    expect(planFewestUnits(oneLab)).toMatchObject({ unitsPerLabArm: 7, obsPerUnit: 25 })
    const icc = 20 / 120
    const power = (k: number, m: number) =>
      clusterPower({ unitsPerArm: k, obsPerUnit: m, difference: 8, variance: 120, icc }).power
    expect(power(7, 25)).toBeGreaterThanOrEqual(0.8)
    // One unit fewer misses the target even with every observation allowed; one observation fewer too.
    expect(power(6, COUNTS_OBS_CAP)).toBeLessThan(0.8)
    expect(power(7, 24)).toBeLessThan(0.8)
  })

  it('agrees with an exhaustive search over labs, units and observations', () => {
    const cases: PlanFewestUnitsInput[] = [
      oneLab,
      { ...oneLab, difference: 5, maxObsPerUnit: 40 },
      { labArmVariance: 2, unitVariance: 20, residualVariance: 100, difference: 8, minLabs: 2, maxLabs: 12 },
      {
        labArmVariance: 0.5,
        unitVariance: 5,
        residualVariance: 60,
        difference: 4,
        minLabs: 3,
        maxLabs: 6,
        arms: 3,
      },
      {
        design: 'one-arm',
        labVariance: 1,
        labArmVariance: 0,
        unitVariance: 10,
        residualVariance: 50,
        difference: 6,
        minLabs: 2,
        maxLabs: 8,
        maxObsPerUnit: 30,
      },
    ]
    for (const input of cases) {
      const plan = planFewestUnits(input)
      const slow = bruteForce(input, input.maxObsPerUnit ?? COUNTS_OBS_CAP)
      expect({ labs: plan.labs, k: plan.unitsPerLabArm, m: plan.obsPerUnit }, JSON.stringify(input)).toEqual(
        slow,
      )
      expect(plan.feasible).toBe(true)
    }
  })

  it('says it searched 100 observations per unit without a limit, and that a limit binds', () => {
    const searched = { code: 'obs-search-range', upTo: 100, why: 'no-costs' }
    expect(planFewestUnits(oneLab).remarks).toContainEqual(searched)
    const limited = planFewestUnits({ ...oneLab, maxObsPerUnit: 5 })
    expect(limited.obsPerUnit).toBeLessThanOrEqual(5)
    expect(limited.remarks).toContainEqual({ code: 'obs-limit-binds' })
    expect(limited.remarks).not.toContainEqual(searched)
  })

  it('reports the most powerful design the unit limit allows when nothing reaches the target', () => {
    const plan = planFewestUnits({ ...oneLab, maxUnitsPerLabArm: 3 })
    expect(plan).toMatchObject({ feasible: false, unitsPerLabArm: 3, obsPerUnit: COUNTS_OBS_CAP })
    expect(plan.remarks[plan.remarks.length - 1]).toEqual({
      code: 'limits-fall-short',
      labs: 1,
      unitsPerLabArm: 3,
      obsPerUnit: COUNTS_OBS_CAP,
      target: 0.8,
      bestPower: plan.achievedPower,
    })
  })

  it('stops below the ceiling that lab-to-lab differences set, and says how many labs it takes', () => {
    const plan = planFewestUnits({
      labArmVariance: 8,
      unitVariance: 20,
      residualVariance: 100,
      difference: 8,
      minLabs: 2,
      maxLabs: 3,
      labWords: { one: 'site', many: 'sites' },
    })
    expect(plan.feasible).toBe(false)
    expect(plan.labs).toBe(3)
    expect(plan.achievedPower).toBeLessThan(plan.ceilingPower)
    expect(plan.achievedPower).toBeGreaterThanOrEqual(plan.ceilingPower - 0.02 - 1e-12)
    expect(plan.fewestLabs).not.toBeNull()
    expect(plan.remarks).toContainEqual(
      expect.objectContaining({ code: 'ceiling-falls-short', labs: 3, fewestLabs: plan.fewestLabs }),
    )
  })

  it('refuses one lab when labs differ in their response, naming the level', () => {
    expect(() =>
      planFewestUnits({ ...oneLab, labArmVariance: 1, labWords: { one: 'day', many: 'days' } }),
    ).toThrow(/with one day/)
  })

  it('refuses impossible inputs with the engine’s words', () => {
    expect(() => planFewestUnits({ ...oneLab, arms: 1 })).toThrow(/two arms/)
    expect(() => planFewestUnits({ ...oneLab, power: 0.01 })).toThrow(/target power/)
    expect(() => planFewestUnits({ ...oneLab, maxObsPerUnit: 0 })).toThrow(/maxObsPerUnit/)
    expect(() => planFewestUnits({ ...oneLab, unitVariance: 0, residualVariance: 0 })).toThrow()
  })
})
