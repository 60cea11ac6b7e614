import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { db } from '../../server/db'
import { insertPlan } from '../../server/repositories/plans.repo'
import stored from '../../shared/planning/fixtures/plan-before-labs.json'
import { Plan, PlanResult, SINGLE_LAB, type PlanInputs } from '../../shared/schemas/plans'
import { closeConnections, createTestApp } from '../support/api'
import { getAs, postAs, signedInTeam } from './datasets-support'

const app = createTestApp()
let team: Awaited<ReturnType<typeof signedInTeam>>

beforeAll(async () => {
  team = await signedInTeam(app)
})

afterAll(closeConnections)

/** Invented three-lab numbers: SD √120 inside a lab and arm (ICC 1/6), the effect differs by SD 2 between labs. */
const consortium = {
  icc: 20 / 120,
  spread: { kind: 'total', sdTotal: Math.sqrt(120) },
  difference: 8,
  costPerUnit: 100,
  costPerObs: 1,
  outer: { name: 'lab', minLabs: 2, maxLabs: 12, costPerLab: 2000, effectSd: 2 },
}

describe('plans saved before the outer level existed', () => {
  it('read as plans for one lab, and their stored JSON stays as it was', async () => {
    // Fixture: a plan as the planner of commit ca30a43 stored it (no outer level, no labs in the result).
    const id = await insertPlan({
      labId: team.lab.id,
      projectId: null,
      analysisVersionId: null,
      name: 'Saved before labs',
      inputs: stored.inputs as unknown as PlanInputs,
      result: stored.result as unknown as PlanResult,
      createdBy: team.pi.id,
    })
    const res = await getAs(app, team.cookies.scientist, `/api/v1/plans/${id}`)
    expect(res.status, JSON.stringify(res.body)).toBe(200)
    const plan = Plan.parse(res.body.data)
    expect(plan.inputs.outer).toEqual(SINGLE_LAB)
    expect(plan.result).toMatchObject({
      labs: 1,
      totalLabs: 1,
      unitsPerArm: stored.result.unitsPerArm,
      obsPerUnit: stored.result.obsPerUnit,
      cost: stored.result.cost,
    })
    const list = await getAs(app, team.cookies.scientist, `/api/v1/plans?labId=${team.lab.id}`)
    expect(list.body.data.find((p: Plan) => p.id === id).result.labs).toBe(1)
    const row = await db('plans').where({ id }).first('inputs', 'result')
    expect(row.inputs).toEqual(stored.inputs)
    expect(row.result).toEqual(stored.result)
  })
})

describe('three-level plans', () => {
  it('previews labs, units per lab and observations per unit, with the labs chart', async () => {
    const res = await postAs(app, team.cookies.scientist, '/api/v1/plans/preview', { inputs: consortium })
    expect(res.status, JSON.stringify(res.body)).toBe(200)
    const result = PlanResult.parse(res.body.data)
    expect(result.labs).toBeGreaterThanOrEqual(2)
    expect(result.df).toBe(result.labs - 1)
    expect(result.labArmVariance).toBeCloseTo(2, 12)
    expect(result.labCurves.map((c) => c.labs)).toContain(result.labs)
    expect(result.power).toBeGreaterThanOrEqual(0.8)
  })

  it('saves a three-level plan with the server-computed result', async () => {
    const res = await postAs(app, team.cookies.pi, '/api/v1/plans', {
      labId: team.lab.id,
      name: 'Consortium follow-up',
      inputs: { ...consortium, outer: { ...consortium.outer, effectSd: null } },
    })
    expect(res.status, JSON.stringify(res.body)).toBe(201)
    const plan = Plan.parse(res.body.data)
    expect(plan.inputs.outer).toMatchObject({ name: 'lab', minLabs: 2, maxLabs: 12, effectSd: null })
    expect(plan.result.labArmVarianceAssumed).toBe(true)
  })

  it('refuses a range upside down (400) and one lab per arm (422)', async () => {
    const upsideDown = await postAs(app, team.cookies.scientist, '/api/v1/plans/preview', {
      inputs: { ...consortium, outer: { ...consortium.outer, minLabs: 6, maxLabs: 3 } },
    })
    expect(upsideDown.status).toBe(400)
    const oneLabPerArm = await postAs(app, team.cookies.scientist, '/api/v1/plans/preview', {
      inputs: { ...consortium, outer: { ...consortium.outer, design: 'one-arm', minLabs: 1, maxLabs: 1 } },
    })
    expect(oneLabPerArm.status).toBe(422)
    expect(oneLabPerArm.body.error.message).toMatch(/at least 2 labs per arm/)
  })
})
