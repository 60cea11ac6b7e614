import seedrandom from 'seedrandom'
import { describe, expect, it } from 'vitest'
import { PlanInputs } from '../schemas/plans'
import { fitNestedReml } from '../stats/fit-nested-reml'
import { prepareNestedDesign } from '../stats/prepare-nested-design'
import { satterthwaiteContrast } from '../stats/satterthwaite-contrast'
import type { NestedColumns } from '../stats/types'
import { computePlan } from './compute-plan'

/**
 * The planner's promise, checked by simulation (common practice, no source): simulate the
 * recommended design many times under the planning model (unit effects N(0, ρσ²), observations
 * N(0, (1 − ρ)σ²), the difference δ between the arms), fit each data set with the engine's REML
 * mixed model, test the arm contrast with Satterthwaite df at α, and count rejections. The share
 * rejected must match the planned power within 3 binomial standard errors of 400 experiments
 * (SE = √(p(1 − p)/400) ≈ 0.02 at p = 0.8, so the band is about ± 0.06).
 */

const EXPERIMENTS = 400
const TOLERANCE_SES = 3

function normalFrom(random: () => number): () => number {
  return () => {
    let u = 0
    while (u === 0) u = random()
    return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * random())
  }
}

function simulate(
  k: number,
  m: number,
  icc: number,
  sd: number,
  delta: number,
  normal: () => number,
): NestedColumns {
  const n = 2 * k * m
  const response = new Float64Array(n)
  const units = new Int32Array(n)
  const arms = new Int32Array(n)
  let row = 0
  for (let arm = 0; arm < 2; arm++) {
    for (let u = 0; u < k; u++) {
      const unitEffect = normal() * sd * Math.sqrt(icc) + (arm === 1 ? delta : 0)
      for (let j = 0; j < m; j++, row++) {
        response[row] = unitEffect + normal() * sd * Math.sqrt(1 - icc)
        units[row] = arm * k + u
        arms[row] = arm
      }
    }
  }
  return {
    responseName: 'y',
    response,
    levels: [{ name: 'mouse', codes: units, labels: Array.from({ length: 2 * k }, (_, i) => `m${i}`) }],
    // The first label is the reference: vehicle.
    factors: [{ name: 'arm', codes: arms, labels: ['vehicle', 'NW-117'] }],
  }
}

describe('computePlan against simulated experiments', () => {
  it(`reaches its planned power: ${EXPERIMENTS} seeded experiments, within ${TOLERANCE_SES} binomial SEs`, () => {
    // Invented planning numbers (ICC 0.2, σ 10, δ 6, a mouse 40 times dearer than a neuron), chosen so
    // the plan has a modest number of units, where the t degrees of freedom matter.
    const inputs = PlanInputs.parse({
      icc: 0.2,
      spread: { kind: 'total', sdTotal: 10 },
      difference: 6,
      alpha: 0.05,
      targetPower: 0.8,
      costPerUnit: 40,
      costPerObs: 1,
    })
    const plan = computePlan(inputs)
    expect(plan.unitsPerArm).toBeGreaterThanOrEqual(4)
    expect(plan.unitsPerArm).toBeLessThanOrEqual(40)

    const normal = normalFrom(seedrandom('nestwise-plan-simulation'))
    let rejected = 0
    for (let e = 0; e < EXPERIMENTS; e++) {
      const columns = simulate(plan.unitsPerArm, plan.obsPerUnit, 0.2, 10, 6, normal)
      const design = prepareNestedDesign(columns)
      const fit = fitNestedReml(design)
      const test = satterthwaiteContrast(design, fit, [0, 1])
      if (test.p < inputs.alpha) rejected++
    }
    const observed = rejected / EXPERIMENTS
    const se = Math.sqrt((plan.power * (1 - plan.power)) / EXPERIMENTS)
    expect(
      Math.abs(observed - plan.power),
      `planned ${plan.power.toFixed(3)}, simulated ${observed}`,
    ).toBeLessThan(TOLERANCE_SES * se)
  })

  it('is not fooled by a design with no effect: the rejection rate is α within 3 binomial SEs', () => {
    const inputs = PlanInputs.parse({
      icc: 0.2,
      spread: { kind: 'total', sdTotal: 10 },
      difference: 6,
      costPerUnit: 40,
      costPerObs: 1,
    })
    const plan = computePlan(inputs)
    const normal = normalFrom(seedrandom('nestwise-plan-simulation-null'))
    let rejected = 0
    for (let e = 0; e < EXPERIMENTS; e++) {
      const columns = simulate(plan.unitsPerArm, plan.obsPerUnit, 0.2, 10, 0, normal)
      const design = prepareNestedDesign(columns)
      const test = satterthwaiteContrast(design, fitNestedReml(design), [0, 1])
      if (test.p < 0.05) rejected++
    }
    const se = Math.sqrt((0.05 * 0.95) / EXPERIMENTS)
    expect(Math.abs(rejected / EXPERIMENTS - 0.05)).toBeLessThan(TOLERANCE_SES * se)
  })
})
