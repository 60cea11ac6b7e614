import { describe, expect, it } from 'vitest'
import { PlanInputs, type PlanSummary } from '../../../shared/schemas/plans'
import { planSummaryRow, planSummaryRows } from './plan-summary-rows'

function plan(overrides: Partial<PlanSummary> = {}): PlanSummary {
  return {
    name: 'Next outgrowth run',
    createdAt: '2026-12-05T10:00:00.000Z',
    inputs: PlanInputs.parse({
      icc: 0.9,
      spread: { kind: 'components', sdBetween: 3, sdWithin: 4 },
      difference: 6,
      costPerUnit: 250,
      costPerObs: 2,
    }),
    result: {
      feasible: true,
      labs: 1,
      design: 'every-arm',
      totalLabs: 1,
      ceilingPower: 1,
      unitsPerArm: 70,
      obsPerUnit: 12,
      totalUnits: 140,
      totalObs: 1680,
      power: 0.8123,
      cost: 4116,
      objective: 'cost',
      designEffect: 4.96,
    },
    ...overrides,
  }
}

describe('planSummaryRow', () => {
  it('describes the starting numbers in words, with the ICC that the SDs between and within imply', () => {
    const row = planSummaryRow(plan(), 'mouse')
    // Common practice, no source: ICC = σ_between² / (σ_between² + σ_within²) = 9 / 25.
    expect(row.assumptions).toEqual([
      'ICC 0.36',
      'SD between mice 3.00, within a mouse 4.00',
      'difference that matters 6.00',
      '2 arms, α 0.05, target power 80 %',
    ])
    expect(row.constraints).toEqual(['cost 250 per mouse + 2 per observation'])
    expect([row.unitsPerArm, row.totalUnits, row.obsPerUnit, row.totalObs, row.power, row.cost]).toEqual([
      '70',
      '140 in all',
      '12',
      '1,680 in all',
      '81 %',
      '4,116',
    ])
    expect(row.shortfall).toBeNull()
  })

  it('shows a typed total SD with its ICC, the limits, and says when the target was not reached', () => {
    const inputs = PlanInputs.parse({
      icc: 0.1,
      spread: { kind: 'total', sdTotal: 25 },
      difference: 10,
      targetPower: 0.9,
      costPerUnit: 100,
      costPerObs: 1,
      maxUnitsPerArm: 6,
      maxObsPerUnit: 20,
    })
    const row = planSummaryRow(plan({ inputs, result: { ...plan().result, feasible: false } }), 'plate')
    expect(row.assumptions.slice(0, 2)).toEqual(['ICC 0.10', 'SD 25.0'])
    expect(row.constraints).toEqual([
      'cost 100 per plate + 1 per observation',
      'at most 6 plates per arm',
      'at most 20 observations per plate',
    ])
    expect(row.shortfall).toMatch(/No design within the limits reaches 90 %/)
    expect(row.labs).toBeNull()
  })

  it('names the labs, the effect SD between them, the range of labs and their cost for a plan over labs', () => {
    const inputs = PlanInputs.parse({
      icc: 0.2,
      spread: { kind: 'total', sdTotal: 11 },
      difference: 8,
      costPerUnit: 100,
      costPerObs: 1,
      maxUnitsPerArm: 6,
      outer: { name: 'lab', minLabs: 2, maxLabs: 12, costPerLab: 2000, effectSd: 2 },
    })
    const result = { ...plan().result, labs: 4, totalLabs: 4, unitsPerArm: 5 }
    const row = planSummaryRow(plan({ inputs, result }), 'mouse')
    expect(row.labs).toBe('4 labs')
    expect(row.assumptions).toContain('effect SD between labs 2.00')
    expect(row.constraints).toEqual([
      '2 to 12 labs',
      'cost 2,000 per lab',
      'cost 100 per mouse + 1 per observation',
      'at most 6 mice per lab and arm',
    ])
    const unknown = PlanInputs.parse({
      ...inputs,
      outer: { ...inputs.outer, effectSd: null, minLabs: 4, maxLabs: 4 },
    })
    const vague = planSummaryRow(plan({ inputs: unknown, result }), 'mouse')
    expect(vague.assumptions).toContain('effect SD between labs unknown (planned as 0)')
    expect(vague.constraints[0]).toBe('4 labs')
    const plates = PlanInputs.parse({
      ...inputs,
      outer: { name: 'plate', design: 'one-arm', minLabs: 3, maxLabs: 3, costPerLab: 50, sdBetweenLabs: 1.5 },
    })
    const onePerArm = planSummaryRow(
      plan({ inputs: plates, result: { ...result, labs: 3, design: 'one-arm' } }),
      'well',
    )
    expect(onePerArm.labs).toBe('3 plates per arm')
    expect(onePerArm.assumptions).toContain('SD between plates 1.50, one arm per plate')
  })
})

describe('planSummaryRows', () => {
  it('lists the oldest plan first', () => {
    const rows = planSummaryRows(
      [plan({ name: 'second', createdAt: '2026-12-06T08:00:00.000Z' }), plan({ name: 'first' })],
      'mouse',
    )
    expect(rows.map((r) => r.name)).toEqual(['first', 'second'])
    expect(new Set(rows.map((r) => r.key)).size).toBe(2)
  })
})

describe('a plan without costs', () => {
  it('says it counted units and shows no cost', () => {
    const inputs = PlanInputs.parse({ icc: 0.2, spread: { kind: 'total', sdTotal: 11 }, difference: 8 })
    const row = planSummaryRow(
      plan({ inputs, result: { ...plan().result, cost: null, objective: 'counts' } }),
      'mouse',
    )
    expect(row.constraints).toEqual(['no costs: the fewest mice'])
    expect(row.cost).toBe('—')
  })
})
