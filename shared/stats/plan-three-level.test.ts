import { describe, expect, it } from 'vitest'
import { planDesign } from './plan-design'
import { planThreeLevel, type PlanThreeLevelInput } from './plan-three-level'
import { threeLevelPower } from './three-level-power'

const example = {
  labArmVariance: 2,
  unitVariance: 20,
  residualVariance: 100,
  difference: 8,
  costPerLab: 2000,
  costPerUnit: 100,
  costPerObs: 1,
}

/** Exhaustive search, the slow way, to check the fast one (common practice, no source). */
function bruteForce(input: PlanThreeLevelInput, maxObs: number, maxUnits = 400) {
  const design = input.design ?? 'every-arm'
  const arms = input.arms ?? 2
  const alpha = (input.alpha ?? 0.05) / ((arms * (arms - 1)) / 2)
  const target = input.power ?? 0.8
  let best: { labs: number; k: number; m: number; cost: number } | null = null
  for (let labs = input.minLabs; labs <= input.maxLabs; labs++) {
    if (labs === 1 && (design === 'one-arm' || input.labArmVariance > 0)) continue
    for (let m = 1; m <= maxObs; m++) {
      for (let k = labs === 1 ? 2 : 1; k <= maxUnits; k++) {
        const power = threeLevelPower({
          ...input,
          design,
          labs,
          unitsPerLabArm: k,
          obsPerUnit: m,
          alpha,
        }).power
        if (power < target) continue
        const cost =
          design === 'every-arm'
            ? labs * (input.costPerLab + arms * k * (input.costPerUnit + m * input.costPerObs))
            : arms * labs * (input.costPerLab + k * (input.costPerUnit + m * input.costPerObs))
        if (!best || cost < best.cost) best = { labs, k, m, cost }
        break
      }
    }
  }
  return best!
}

describe('planThreeLevel', () => {
  it('finds the cheapest labs, units per lab and observations per unit that reach the target', () => {
    const input = { ...example, minLabs: 2, maxLabs: 8 }
    const r = planThreeLevel(input)
    const brute = bruteForce(input, 90)
    expect(r.feasible).toBe(true)
    expect(r.cost).toBe(brute.cost)
    expect([r.labs, r.unitsPerLabArm, r.obsPerUnit]).toEqual([brute.labs, brute.k, brute.m])
    expect(r.achievedPower).toBeGreaterThanOrEqual(0.8)
    expect(r.df).toBe(r.labs - 1)
    expect(r.totalUnits).toBe(2 * r.labs * r.unitsPerLabArm)
    expect(r.totalObs).toBe(r.totalUnits * r.obsPerUnit)
    // m* = √((c_unit/c_obs)·σ²_resid/σ²_unit) = √(100·5) (Raudenbush 1997 via costOptimalObsPerUnit).
    expect(r.mStar).toBeCloseTo(Math.sqrt(500), 12)
  })

  it('plans each lab running one arm, and more than two arms, as the brute force does', () => {
    const oneArm = {
      ...example,
      design: 'one-arm' as const,
      labVariance: 3,
      minLabs: 2,
      maxLabs: 6,
      difference: 10,
    }
    const r = planThreeLevel(oneArm)
    const brute = bruteForce(oneArm, 90)
    expect([r.labs, r.unitsPerLabArm, r.obsPerUnit, r.cost]).toEqual([
      brute.labs,
      brute.k,
      brute.m,
      brute.cost,
    ])
    expect(r.df).toBe(2 * (r.labs - 1))
    expect(r.totalLabs).toBe(2 * r.labs)
    const threeArms = { ...example, arms: 3, minLabs: 3, maxLabs: 6 }
    const three = planThreeLevel(threeArms)
    expect(three.cost).toBe(bruteForce(threeArms, 90).cost)
    expect(three.alphaPerComparison).toBeCloseTo(0.05 / 3, 12)
    expect(three.remarks).toContainEqual({
      code: 'pairwise-bonferroni',
      arms: 3,
      alphaPerComparison: three.alphaPerComparison,
    })
  })

  it('is the two-level planner plus the cost of the lab when the plan is for one lab (property)', () => {
    // The one-lab case must be the existing planner exactly (same k, m, power), cost + c_lab.
    for (const icc of [0.05, 0.2, 0.5]) {
      const variance = 120
      const r = planThreeLevel({
        ...example,
        labArmVariance: 0,
        unitVariance: icc * variance,
        residualVariance: (1 - icc) * variance,
        minLabs: 1,
        maxLabs: 1,
        difference: 6,
      })
      const two = planDesign({ icc, variance, difference: 6, costPerUnit: 100, costPerObs: 1 })
      expect([r.labs, r.unitsPerLabArm, r.obsPerUnit]).toEqual([1, two.unitsPerArm, two.obsPerUnit])
      expect(r.achievedPower).toBe(two.achievedPower)
      expect(r.cost).toBe(two.cost + 2000)
      expect(r.ceilingPower).toBe(1)
    }
  })

  it('says when more units cannot make up for lab-to-lab differences, and how many labs it takes', () => {
    // σ²_lab×arm 8 with δ 6: with 4 labs the ceiling is below 80 %.
    const input = { ...example, labArmVariance: 8, difference: 6, minLabs: 2, maxLabs: 4 }
    const r = planThreeLevel(input)
    expect(r.feasible).toBe(false)
    expect(r.labs).toBe(4)
    expect(r.ceilingPower).toBeLessThan(0.8)
    expect(r.achievedPower).toBeLessThanOrEqual(r.ceilingPower)
    expect(r.achievedPower).toBeGreaterThanOrEqual(r.ceilingPower - 0.02 - 1e-9)
    expect(r.fewestLabs).not.toBeNull()
    // The fewest labs are the first whose ceiling reaches the target (common practice, no source).
    const ceiling = (labs: number) =>
      threeLevelPower({ ...input, labs, unitsPerLabArm: 1e9, obsPerUnit: 1e6 }).power
    expect(ceiling(r.fewestLabs!)).toBeGreaterThanOrEqual(0.8)
    expect(ceiling(r.fewestLabs! - 1)).toBeLessThan(0.8)
    expect(r.remarks).toContainEqual(
      expect.objectContaining({ code: 'ceiling-falls-short', labs: 4, fewestLabs: r.fewestLabs }),
    )
    // Allowing that many labs makes the plan feasible.
    expect(planThreeLevel({ ...input, maxLabs: r.fewestLabs! + 4 }).feasible).toBe(true)
  })

  it('respects limits, starts at two labs when one cannot do, and reports the most powerful design when limits bind', () => {
    const limited = planThreeLevel({
      ...example,
      minLabs: 1,
      maxLabs: 10,
      maxObsPerUnit: 8,
      maxUnitsPerLabArm: 4,
    })
    expect(limited.obsPerUnit).toBeLessThanOrEqual(8)
    expect(limited.unitsPerLabArm).toBeLessThanOrEqual(4)
    expect(limited.labs).toBeGreaterThanOrEqual(2)
    expect(limited.remarks).toContainEqual({ code: 'labs-start-at-two', design: 'every-arm' })
    const impossible = planThreeLevel({
      ...example,
      minLabs: 2,
      maxLabs: 3,
      maxUnitsPerLabArm: 2,
      maxObsPerUnit: 10,
    })
    expect(impossible.feasible).toBe(false)
    expect([impossible.labs, impossible.unitsPerLabArm, impossible.obsPerUnit]).toEqual([3, 2, 10])
    expect(impossible.remarks).toContainEqual(
      expect.objectContaining({ code: 'limits-fall-short', labs: 3, unitsPerLabArm: 2, obsPerUnit: 10 }),
    )
  })

  it('refuses malformed input', () => {
    const ok = { ...example, minLabs: 2, maxLabs: 6 }
    expect(() => planThreeLevel({ ...ok, minLabs: 1, maxLabs: 1 })).toThrow(/allow at least 2 labs/)
    expect(() => planThreeLevel({ ...ok, design: 'one-arm', minLabs: 1, maxLabs: 1 })).toThrow(
      /at least 2 labs per arm/,
    )
    expect(() => planThreeLevel({ ...ok, minLabs: 5, maxLabs: 3 })).toThrow(/smallest first/)
    expect(() => planThreeLevel({ ...ok, maxLabs: 2000 })).toThrow(/from 1 to 1000/)
    expect(() => planThreeLevel({ ...ok, arms: 1 })).toThrow(/two arms/)
    expect(() => planThreeLevel({ ...ok, power: 1 })).toThrow(/target power/)
    expect(() => planThreeLevel({ ...ok, maxUnitsPerLabArm: 0 })).toThrow(/maxUnitsPerLabArm/)
    expect(() => planThreeLevel({ ...ok, maxObsPerUnit: 1.5 })).toThrow(/maxObsPerUnit/)
    expect(() => planThreeLevel({ ...ok, costPerLab: -1 })).toThrow(/costPerLab/)
    expect(() => planThreeLevel({ ...ok, costPerUnit: 0, costPerObs: 0 })).toThrow(/non-zero cost/)
    expect(() => planThreeLevel({ ...ok, unitVariance: 0, residualVariance: 0 })).toThrow(
      /spread inside the labs/,
    )
    expect(() => planThreeLevel({ ...ok, difference: 0 })).toThrow(/non-zero/)
  })
})
