import { describe, expect, it } from 'vitest'
import { planDesign } from './plan-design'
import { clusterPower } from './cluster-power'

/** Exhaustive search, the slow way, to check the fast one (common practice, no source). */
function bruteForce(
  input: {
    icc: number
    variance: number
    difference: number
    costPerUnit: number
    costPerObs: number
    arms?: number
  },
  maxObs: number,
) {
  const arms = input.arms ?? 2
  const alpha = 0.05 / ((arms * (arms - 1)) / 2)
  let best: { k: number; m: number; cost: number } | null = null
  for (let m = 1; m <= maxObs; m++) {
    let k = 2
    while (
      clusterPower({
        unitsPerArm: k,
        obsPerUnit: m,
        difference: input.difference,
        variance: input.variance,
        icc: input.icc,
        alpha,
      }).power < 0.8
    )
      k++
    const cost = arms * k * (input.costPerUnit + m * input.costPerObs)
    if (!best || cost < best.cost) best = { k, m, cost }
  }
  return best!
}

describe('planDesign', () => {
  it('finds the cheapest design that reaches the target power', () => {
    const input = { icc: 0.1, variance: 5, difference: 1, costPerUnit: 100, costPerObs: 1 }
    const r = planDesign(input)
    const brute = bruteForce(input, 120)
    expect(r.feasible).toBe(true)
    expect(r.cost).toBe(brute.cost)
    expect([r.unitsPerArm, r.obsPerUnit]).toEqual([brute.k, brute.m])
    expect(r.achievedPower).toBeGreaterThanOrEqual(0.8)
    expect(r.mStar).toBe(30)
    expect(r.totalUnits).toBe(2 * r.unitsPerArm)
    expect(r.totalObs).toBe(2 * r.unitsPerArm * r.obsPerUnit)
    expect(r.deff).toBeCloseTo(1 + (r.obsPerUnit - 1) * 0.1, 12)
  })

  it('plans pairwise comparisons at the Bonferroni level for three arms', () => {
    const input = { icc: 0.1, variance: 5, difference: 1, costPerUnit: 100, costPerObs: 1, arms: 3 }
    const r = planDesign(input)
    expect(r.alphaPerComparison).toBeCloseTo(0.05 / 3, 12)
    expect(r.cost).toBe(bruteForce(input, 120).cost)
    expect(r.notes.join(' ')).toMatch(/Bonferroni/)
  })

  it('searches a capped range when the ICC is 0 and says so', () => {
    const input = { icc: 0, variance: 5, difference: 1, costPerUnit: 100, costPerObs: 1 }
    const r = planDesign(input)
    expect(r.mStar).toBeNull()
    expect(r.searchedUpToObsPerUnit).toBe(1000)
    expect(r.notes.join(' ')).toMatch(/no finite optimum/)
    expect(r.cost).toBe(bruteForce(input, 200).cost)
  })

  it('respects limits and reports an infeasible plan honestly', () => {
    const limited = planDesign({
      icc: 0.1,
      variance: 5,
      difference: 1,
      costPerUnit: 100,
      costPerObs: 1,
      maxObsPerUnit: 8,
    })
    expect(limited.obsPerUnit).toBeLessThanOrEqual(8)
    expect(limited.achievedPower).toBeGreaterThanOrEqual(0.8)
    const impossible = planDesign({
      icc: 0.3,
      sdTotal: 10,
      difference: 2,
      costPerUnit: 500,
      costPerObs: 2,
      maxUnitsPerArm: 8,
      maxObsPerUnit: 50,
    })
    expect(impossible.feasible).toBe(false)
    expect(impossible.unitsPerArm).toBe(8)
    expect(impossible.obsPerUnit).toBe(50)
    expect(impossible.achievedPower).toBeLessThan(0.8)
    expect(impossible.notes.join(' ')).toMatch(/No design within 8 units per arm/)
  })

  it('refuses malformed input', () => {
    const ok = { icc: 0.1, variance: 5, difference: 1, costPerUnit: 100, costPerObs: 1 }
    expect(() => planDesign({ ...ok, arms: 1 })).toThrow(/at least two arms/)
    expect(() => planDesign({ ...ok, arms: 2.5 })).toThrow(/arms/)
    expect(() => planDesign({ ...ok, maxUnitsPerArm: 1 })).toThrow(
      /maxUnitsPerArm must be a whole number of at least 2/,
    )
    expect(() => planDesign({ ...ok, maxObsPerUnit: 0 })).toThrow(/maxObsPerUnit/)
    expect(() => planDesign({ ...ok, power: 1.2 })).toThrow(/target power/)
    expect(() => planDesign({ ...ok, alpha: 1 })).toThrow(/alpha/)
    expect(() => planDesign({ ...ok, icc: 2 })).toThrow(/icc/)
    expect(() => planDesign({ ...ok, costPerUnit: -5 })).toThrow(/costPerUnit/)
    expect(() => planDesign({ ...ok, difference: 0 })).toThrow(/non-zero/)
  })
})
