import { describe, expect, it } from 'vitest'
import type { AnalysisResult } from '../schemas/analysis-result'
import demo from '../report/fixtures/single-lab-demo.json'
import { PlanDraftInputs, PlanInputs, SINGLE_LAB } from '../schemas/plans'
import { v01, v02 } from './fixtures/multi-lab-results'
import { suggestPlanInputs } from './suggest-plan-inputs'

// Fixture: the engine's stored result for the seeded single-lab demo analysis (10 mice, 2 arms).
const result = demo.result as AnalysisResult

describe('suggestPlanInputs', () => {
  it('splits the total variance by the ICC of the mouse level, and leaves difference and costs to the person', () => {
    const suggested = suggestPlanInputs(result)!
    const icc = result.icc.find((e) => e.level === 'mouse')!.icc
    const total = result.varianceComponents.reduce((s, c) => s + c.variance, 0)
    expect(suggested.unitLevel).toBe('mouse')
    // Common practice, no source: σ_between² = ICC · σ², σ_within² = (1 − ICC) · σ².
    expect(suggested.inputs.spread).toEqual({
      kind: 'components',
      sdBetween: expect.closeTo(Math.sqrt(icc * total), 12),
      sdWithin: expect.closeTo(Math.sqrt((1 - icc) * total), 12),
    })
    // The difference that matters is asked for; the observed one is a reference beside the field.
    expect(suggested.inputs.difference).toBeNull()
    expect(suggested.inputs.costPerUnit).toBeNull()
    expect(suggested.inputs.costPerObs).toBeNull()
    const contrast = result.comparisons.mixedModel!.contrasts[0]
    expect(suggested.observed).toMatchObject({
      what: 'NW-117 − vehicle',
      estimate: contrast.estimate,
      p: contrast.p,
    })
    // R: 7.619431734895755 + c(-1, 1) * qt(0.975, 8.056916622693118) * 12.459186086713249 → -21.08, 36.32
    expect(suggested.observed!.ci![0]).toBeCloseTo(-21.08, 2)
    expect(suggested.observed!.ci![1]).toBeCloseTo(36.32, 2)
    expect(PlanDraftInputs.safeParse(suggested.inputs).success).toBe(true)
    // Once the person gives a difference, the suggestion is a valid plan without costs.
    expect(PlanInputs.safeParse({ ...suggested.inputs, difference: 10 }).success).toBe(true)
    expect(suggested.inputs.arms).toBe(2)
    expect(suggested.unitsInData).toBe(5)
    // One level: a plan for one lab, as before.
    expect(suggested.inputs.outer).toEqual(SINGLE_LAB)
    expect(suggested.labArmVarianceSource).toBe('not-needed')
  })

  it('suggests the three levels from the maximal model: effect SD between labs √(2 σ²_lab×arm)', () => {
    const suggested = suggestPlanInputs(v02)!
    // Invented components (fixtures/multi-lab-results.ts): lab:treatment 2, mouse 20, residual 100.
    expect(suggested.inputs.spread).toEqual({ kind: 'components', sdBetween: Math.sqrt(20), sdWithin: 10 })
    expect(suggested.inputs.icc).toBeCloseTo(20 / 120, 12)
    expect(suggested.inputs.outer).toMatchObject({
      name: 'lab',
      design: 'every-arm',
      minLabs: 4,
      maxLabs: 4,
      effectSd: 2,
      sdBetweenLabs: null,
      costPerLab: null,
    })
    expect(suggested).toMatchObject({ outerLevel: 'lab', labsInData: 4, labArmVarianceSource: 'analysis' })
    expect(PlanInputs.safeParse({ ...suggested.inputs, difference: 5 }).success).toBe(true)
  })

  it('leaves the effect SD between labs unknown for an engine 0.1 result, and says so', () => {
    const suggested = suggestPlanInputs(v01)!
    expect(suggested.inputs.outer.effectSd).toBeNull()
    expect(suggested.labArmVarianceSource).toBe('unknown')
    expect(suggested.mapping.join(' ')).toMatch(/did not estimate/)
    // The lab variance cancels from a comparison within labs: only mouse and cell spread remain.
    expect(suggested.inputs.spread).toEqual({ kind: 'components', sdBetween: Math.sqrt(20), sdWithin: 10 })
  })

  it('has no observed reference without a contrast, and nothing without variation', () => {
    const noContrast = { ...result, comparisons: { ...result.comparisons, mixedModel: null } }
    expect(suggestPlanInputs(noContrast)).toMatchObject({ observed: null })
    expect(suggestPlanInputs(noContrast)!.inputs.difference).toBeNull()
    const flat = {
      ...result,
      varianceComponents: result.varianceComponents.map((c) => ({ ...c, variance: 0 })),
    }
    expect(suggestPlanInputs(flat)).toBeNull()
  })
})
