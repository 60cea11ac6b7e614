import seedrandom from 'seedrandom'
import { describe, expect, it } from 'vitest'
import { analyzeNested } from '../analysis/analyze-nested'
import { inventedNeuronTable } from '../analysis/fixtures/invented-glmm-tables'
import { PlanInputs, PlanResult } from '../schemas/plans'
import { nestedColumnsFromTable } from '../stats/fixtures/nested-columns-from-table'
import { normalQuantile } from '../stats/normal-quantile'
import { computePlan } from './compute-plan'
import { simulatedUnitTPower } from './fixtures/simulated-unit-t-power'
import { resolveSpread } from './resolve-spread'
import { suggestPlanInputs } from './suggest-plan-inputs'

/** An invented plan: 4 puncta per neuron under vehicle, 5.5 to detect, latent ICC 0.2. */
const rates = PlanInputs.parse({
  icc: 0,
  spread: { kind: 'total', sdTotal: 1 },
  difference: 1.5,
  costPerUnit: 100,
  costPerObs: 1,
  measure: { kind: 'rate', control: 4, latentIcc: 0.2 },
})

describe('computePlan for a difference in rates', () => {
  it('takes the ICC on the count scale from the latent ICC by the lognormal–Poisson moments', () => {
    // R 4.2 (Nakagawa, Johnson & Schielzeth 2017, log link): σ²_u = 0.2 · log1p(1/4) / 0.8,
    // λ̄ = 4.75, Var(λ_u) = λ̄²(exp(σ²_u) − 1); ICC = Var(λ_u) / (λ̄ + Var(λ_u)) = 0.214153721006,
    // SD = √(λ̄ + Var(λ_u)) = 2.45854410808.
    const spread = resolveSpread(rates)
    expect(spread.icc).toBeCloseTo(0.214153721006, 10)
    expect(spread.sdTotal).toBeCloseTo(2.45854410808, 10)
  })

  it('gives the power of the unit-means test with that design effect (R: pt with ncp)', () => {
    // R 4.2: deff = 1 + 9 · 0.214153721; ncp = √(10 · 10 / (2 deff)) · 1.5 / 2.45854410808;
    // power = 1 − pt(qt(0.975, 18), 18, ncp) + pt(−qt(0.975, 18), 18, ncp) = 0.664750178987.
    const plan = computePlan(rates)
    const curve = plan.powerCurves.find((c) => c.obsPerUnit === 10)!
    expect(curve.points.find((p) => p.unitsPerArm === 10)!.power).toBeCloseTo(0.664750178987, 6)
    expect(plan.measure).toEqual({ kind: 'rate', control: 4, target: 5.5, latentIcc: 0.2 })
    expect(plan.notes[0]).toBe('Planned for a rate of 4 in the control arm against 5.5: a difference of 1.5.')
    expect(plan.notes[1]).toContain('Nakagawa, Johnson & Schielzeth 2017')
    expect(plan.notes[1]).toContain('Poisson mixed model')
    expect(() => PlanResult.parse(plan)).not.toThrow()
  })

  it('reaches about its planned power in a simulation of lognormal–Poisson units analysed on unit means', () => {
    // Simulation (common practice): units with rates exp(η + u), u ~ N(0, σ²_u), averaging 4 and
    // 5.5, m Poisson counts each, Student's t on the units' mean counts; seeded, 1500 experiments.
    // Monte Carlo SE of a power near 0.8 is 0.01.
    const plan = computePlan(rates)
    const k = plan.unitsPerArm
    const m = plan.obsPerUnit
    const unitVariance = (0.2 * Math.log1p(1 / 4)) / 0.8
    const etas = [4, 5.5].map((rate) => Math.log(rate) - unitVariance / 2) as [number, number]
    const rng = seedrandom('plan-rates')
    const normal = () => normalQuantile(Math.min(Math.max(rng(), 1e-12), 1 - 1e-12))
    const poisson = (mean: number) => {
      const limit = Math.exp(-mean)
      let count = 0
      for (let product = rng(); product > limit; product *= rng()) count++
      return count
    }
    const power = simulatedUnitTPower(etas, k, 1500, (eta) => {
      const rate = Math.exp(eta + Math.sqrt(unitVariance) * normal())
      let total = 0
      for (let i = 0; i < m; i++) total += poisson(rate)
      return total / m
    })
    expect(plan.power).toBeGreaterThanOrEqual(0.8)
    expect(Math.abs(power - plan.power)).toBeLessThan(0.05)
  })
})

describe('suggestPlanInputs from a count analysis', () => {
  // Invented neurons in mice in three fictional labs (shared/analysis/fixtures).
  const result = analyzeNested(
    {
      ...nestedColumnsFromTable(inventedNeuronTable(), 'puncta', ['lab', 'mouse'], 'treatment'),
      family: 'poisson',
    },
    { reference: { treatment: 'vehicle' } },
  )

  it('plans on the count scale: the control arm’s rate, the latent ICC of the mice at that rate', () => {
    const suggested = suggestPlanInputs(result)!
    const vehicle = result.groups.find((g) => g.condition === 'vehicle')!
    const treated = result.groups.find((g) => g.condition === 'QZ-41')!
    const mouse = result.varianceComponents.find((c) => c.level === 'mouse')!.variance
    expect(suggested.unitLevel).toBe('mouse')
    expect(suggested.inputs.measure).toEqual({
      kind: 'rate',
      control: vehicle.mean,
      // Nakagawa et al. 2017, log link: σ²_mouse / (σ²_mouse + ln(1 + 1/λ₀)) at the control rate.
      latentIcc: expect.closeTo(mouse / (mouse + Math.log1p(1 / vehicle.mean)), 12),
    })
    expect(suggested.inputs.difference).toBeNull()
    expect(suggested.observed).toMatchObject({
      what: 'QZ-41 − vehicle (plain rates of all observations)',
      estimate: expect.closeTo(treated.mean - vehicle.mean, 12),
      p: result.comparisons.mixedModel!.contrasts[0].p,
    })
    const plan = computePlan(PlanInputs.parse({ ...suggested.inputs, difference: 1 }))
    expect(plan.measure).toMatchObject({ kind: 'rate', control: vehicle.mean, target: vehicle.mean + 1 })
  })
})
