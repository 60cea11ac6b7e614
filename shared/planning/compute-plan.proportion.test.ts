import seedrandom from 'seedrandom'
import { describe, expect, it } from 'vitest'
import { analyzeNested } from '../analysis/analyze-nested'
import { inventedNeuronTable } from '../analysis/fixtures/invented-glmm-tables'
import { PlanInputs, PlanResult } from '../schemas/plans'
import { nestedColumnsFromTable } from '../stats/fixtures/nested-columns-from-table'
import { normalQuantile } from '../stats/normal-quantile'
import { observedScaleIcc } from '../stats/observed-scale-icc'
import { computePlan } from './compute-plan'
import { simulatedUnitTPower } from './fixtures/simulated-unit-t-power'
import { resolveSpread } from './resolve-spread'
import { suggestPlanInputs } from './suggest-plan-inputs'

/** An invented plan: 40 % marker-positive neurons under vehicle, 55 % to detect, latent ICC 0.1. */
const proportions = PlanInputs.parse({
  icc: 0,
  spread: { kind: 'total', sdTotal: 1 },
  difference: 0.15,
  costPerUnit: 100,
  costPerObs: 1,
  measure: { kind: 'proportion', control: 0.4, latentIcc: 0.1 },
})

describe('computePlan for a difference in proportions', () => {
  it('takes the ICC on the proportion scale from the latent ICC, as R’s integrate() gives it', () => {
    // R 4.2 (integrate, uniroot; the script is in the comment of observed-scale-icc.test.ts):
    // σ²_u = 0.1 · (π²/3) / 0.9, p̄ = 0.475 → ICC 0.0778219052; SD √(p̄(1 − p̄)).
    const spread = resolveSpread(proportions)
    expect(spread.icc).toBeCloseTo(0.0778219052, 8)
    expect(spread.sdTotal).toBeCloseTo(Math.sqrt(0.475 * 0.525), 14)
  })

  it('gives the power of the unit-means test with that design effect (R: pt with ncp)', () => {
    // R 4.2: deff = 1 + 19 · 0.0778219; ncp = √(12 · 20 / (2 deff)) · 0.15 / √(0.475 · 0.525);
    // power = 1 − pt(qt(0.975, 22), 22, ncp) + pt(−qt(0.975, 22), 22, ncp) = 0.5153787064.
    const plan = computePlan(proportions)
    const curve = plan.powerCurves.find((c) => c.obsPerUnit === 20)!
    expect(curve.points.find((p) => p.unitsPerArm === 12)!.power).toBeCloseTo(0.5153787064, 6)
    expect(plan.measure).toEqual({ kind: 'proportion', control: 0.4, target: 0.55, latentIcc: 0.1 })
    expect(plan.notes[0]).toBe(
      'Planned for a proportion of 0.4 in the control arm against 0.55: a difference of 0.15.',
    )
    expect(plan.notes[1]).toContain('Goldstein, Browne & Rasbash 2002')
    expect(() => PlanResult.parse(plan)).not.toThrow()
  })

  it('reaches about its planned power in a simulation of logit-normal units analysed on unit proportions', () => {
    // Simulation (common practice): units with logit-normal proportions around 0.40 and 0.55
    // (latent variance from the latent ICC), m yes/no observations each, Student's t on the
    // units' proportions; seeded, 1500 experiments. Monte Carlo SE of a power near 0.8 is 0.01.
    const plan = computePlan(proportions)
    const k = plan.unitsPerArm
    const m = plan.obsPerUnit
    const unitVariance = (0.1 * (Math.PI * Math.PI)) / 3 / 0.9
    const etas = [0.4, 0.55].map((p) => observedScaleIcc({ link: 'logit', mean: p, unitVariance }).eta) as [
      number,
      number,
    ]
    const rng = seedrandom('plan-proportions')
    const normal = () => normalQuantile(Math.min(Math.max(rng(), 1e-12), 1 - 1e-12))
    const power = simulatedUnitTPower(etas, k, 1500, (eta) => {
      const p = 1 / (1 + Math.exp(-(eta + Math.sqrt(unitVariance) * normal())))
      let yes = 0
      for (let i = 0; i < m; i++) if (rng() < p) yes++
      return yes / m
    })
    expect(plan.power).toBeGreaterThanOrEqual(0.8)
    expect(Math.abs(power - plan.power)).toBeLessThan(0.05)
  })

  it('refuses a target proportion of 1 or more', () => {
    const bad = PlanInputs.safeParse({ ...proportions, difference: 0.6 })
    expect(bad.success).toBe(false)
  })
})

describe('suggestPlanInputs from a yes/no analysis', () => {
  // Invented neurons in mice in three fictional labs (shared/analysis/fixtures).
  const result = analyzeNested(
    {
      ...nestedColumnsFromTable(inventedNeuronTable(), 'marker01', ['lab', 'mouse'], 'treatment'),
      family: 'binomial',
    },
    { reference: { treatment: 'vehicle' } },
  )

  it('plans on the proportion scale: control proportion, latent ICC of the mice, the plain difference as a reference', () => {
    const suggested = suggestPlanInputs(result)!
    const vehicle = result.groups.find((g) => g.condition === 'vehicle')!
    const treated = result.groups.find((g) => g.condition === 'QZ-41')!
    const mouse = result.varianceComponents.find((c) => c.level === 'mouse')!.variance
    expect(suggested.unitLevel).toBe('mouse')
    expect(suggested.inputs.measure).toEqual({
      kind: 'proportion',
      control: vehicle.mean,
      // Nakagawa et al. 2017: σ²_mouse / (σ²_mouse + π²/3).
      latentIcc: expect.closeTo(mouse / (mouse + (Math.PI * Math.PI) / 3), 12),
    })
    // The difference is the person's to give; the plain one observed comes along as a reference, with the model's p.
    expect(suggested.inputs.difference).toBeNull()
    expect(suggested.observed).toEqual({
      what: 'QZ-41 − vehicle (plain proportions of all observations)',
      estimate: expect.closeTo(treated.mean - vehicle.mean, 12),
      ci: null,
      p: result.comparisons.mixedModel!.contrasts[0].p,
    })
    const parsed = PlanInputs.parse({ ...suggested.inputs, difference: 0.15 })
    // Until a difference is given, the spread shown is the control arm's (difference 0).
    expect(parsed.spread).toEqual({
      kind: 'total',
      sdTotal: expect.closeTo(resolveSpread({ ...parsed, difference: 0 }).sdTotal, 12),
    })
    expect(computePlan(parsed).measure?.kind).toBe('proportion')
  })
})
