import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { Plan, PlanDefaults, PlanResult } from '../../shared/schemas/plans'
import { startAnalysisRunner, stopAnalysisRunner } from '../../server/jobs/analysis-runner'
import { closeConnections, createTestApp } from '../support/api'
import { neuriteCsv, pollUntilFinished, taggedDataset } from './analyses-support'
import { deleteAs, getAs, patchAs, postAs, signedInTeam } from './datasets-support'

const app = createTestApp()
let team: Awaited<ReturnType<typeof signedInTeam>>
let outsider: Awaited<ReturnType<typeof signedInTeam>>
let analysisId: number

/** The worked example in the documentation of the R package clusterPower (crtpwr.2mean). */
const clusterPowerExample = {
  icc: 0.1,
  spread: { kind: 'total', sdTotal: Math.sqrt(5) },
  difference: 1,
  alpha: 0.05,
  targetPower: 0.8,
  arms: 2,
  costPerUnit: 100,
  costPerObs: 1,
  maxObsPerUnit: 10,
}

beforeAll(async () => {
  startAnalysisRunner({ pollMs: 100, reapEveryMs: 500 })
  ;[team, outsider] = await Promise.all([signedInTeam(app), signedInTeam(app)])
  const dataset = await taggedDataset(
    app,
    team.cookies.scientist,
    team.lab.id,
    neuriteCsv({ seed: 'plans-pilot', mice: 8, effect: 6 }),
  )
  const res = await postAs(app, team.cookies.scientist, '/api/v1/analyses', { datasetId: dataset.id })
  expect(res.status, JSON.stringify(res.body)).toBe(201)
  analysisId = res.body.data.id
  const { final } = await pollUntilFinished(app, team.cookies.scientist, analysisId, 1)
  expect(final.status).toBe('done')
})

afterAll(async () => {
  await stopAnalysisRunner()
  await closeConnections()
})

describe('plan preview', () => {
  it('reproduces the clusterPower worked example: m = 10 capped, 16 units per arm', async () => {
    // clusterPower (R) crtpwr.2mean documentation: m = 10, d = 1, ICC 0.1, σ² = 5, α 0.05, power 0.8 → 15.93
    // clusters per arm; the engine test shared/stats/units-needed.test.ts checks the continuous value.
    const res = await postAs(app, team.cookies.biostatistician, '/api/v1/plans/preview', {
      inputs: clusterPowerExample,
    })
    expect(res.status, JSON.stringify(res.body)).toBe(200)
    const result = PlanResult.parse(res.body.data)
    expect(result.obsPerUnit).toBe(10)
    expect(result.unitsPerArm).toBe(16)
    expect(result.power).toBeGreaterThanOrEqual(0.8)
    expect(result.cost).toBe(2 * 16 * (100 + 10))
    expect(result.designEffect).toBeCloseTo(1.9, 12)
    // The power curve of the recommended m passes through the recommendation.
    const curve = result.powerCurves.find((c) => c.obsPerUnit === 10)!
    expect(curve.points.find((p) => p.unitsPerArm === 16)!.power).toBeCloseTo(result.power, 12)
    // Effective observations per unit level off at 1/ICC = 10 (common practice: m / (1 + (m − 1)ρ) → 1/ρ).
    const last = result.obsCurve.at(-1)!
    expect(last.effectivePerUnit).toBeLessThan(10)
    expect(last.effectivePerUnit).toBeGreaterThan(8.5)
  })

  it('derives ICC and total SD from SDs between and within units', async () => {
    const res = await postAs(app, team.cookies.scientist, '/api/v1/plans/preview', {
      inputs: {
        ...clusterPowerExample,
        spread: { kind: 'components', sdBetween: Math.sqrt(0.5), sdWithin: Math.sqrt(4.5) },
      },
    })
    expect(res.status).toBe(200)
    expect(res.body.data.icc).toBeCloseTo(0.1, 12)
    expect(res.body.data.sdTotal).toBeCloseTo(Math.sqrt(5), 12)
    expect(res.body.data.unitsPerArm).toBe(16)
  })

  it('refuses impossible inputs: 400 for the shape, 422 when no plan exists', async () => {
    const bad = await postAs(app, team.cookies.scientist, '/api/v1/plans/preview', {
      inputs: { ...clusterPowerExample, difference: -1 },
    })
    expect(bad.status).toBe(400)
    const noCost = await postAs(app, team.cookies.scientist, '/api/v1/plans/preview', {
      inputs: { ...clusterPowerExample, costPerUnit: 0, costPerObs: 0 },
    })
    expect(noCost.status).toBe(400)
    const infeasibleIcc = await postAs(app, team.cookies.scientist, '/api/v1/plans/preview', {
      inputs: { ...clusterPowerExample, icc: 1, difference: 1e-6, maxUnitsPerArm: null },
    })
    expect(infeasibleIcc.status).toBe(422)
    expect(infeasibleIcc.body.error.code).toBe('UNPROCESSABLE')
  })
})

describe('plans from an analysis', () => {
  it('suggests inputs from the finished version: ICC of the mouse level and its spread; the observed difference only as a reference', async () => {
    const res = await getAs(
      app,
      team.cookies.biostatistician,
      `/api/v1/plans/defaults?analysisId=${analysisId}&versionNo=1`,
    )
    expect(res.status, JSON.stringify(res.body)).toBe(200)
    const defaults = PlanDefaults.parse(res.body.data)
    const version = await getAs(app, team.cookies.scientist, `/api/v1/analyses/${analysisId}/versions/1`)
    const result = version.body.data.result
    const icc = result.icc.find((e: { level: string }) => e.level === 'mouse').icc
    const total = result.varianceComponents.reduce((s: number, c: { variance: number }) => s + c.variance, 0)
    expect(defaults.unitLevel).toBe('mouse')
    expect(defaults.inputs.icc).toBeCloseTo(icc, 12)
    expect(defaults.inputs.spread).toEqual({
      kind: 'components',
      sdBetween: expect.closeTo(Math.sqrt(icc * total), 9),
      sdWithin: expect.closeTo(Math.sqrt((1 - icc) * total), 9),
    })
    // The difference that matters is the person's to give; costs stay empty until given.
    expect(defaults.inputs.difference).toBeNull()
    expect([defaults.inputs.costPerUnit, defaults.inputs.costPerObs]).toEqual([null, null])
    expect(defaults.observed!.estimate).toBeCloseTo(result.comparisons.mixedModel.contrasts[0].estimate, 12)
    expect(defaults.unitsInData).toBe(4)
  })

  it('is 404 outside the lab', async () => {
    const res = await getAs(
      app,
      outsider.cookies.pi,
      `/api/v1/plans/defaults?analysisId=${analysisId}&versionNo=1`,
    )
    expect(res.status).toBe(404)
  })
})

describe('saving plans', () => {
  let planId: number

  it('saves a plan from an analysis with the server-computed result, attached to a project', async () => {
    const defaults = (
      await getAs(app, team.cookies.pi, `/api/v1/plans/defaults?analysisId=${analysisId}&versionNo=1`)
    ).body.data as PlanDefaults
    const res = await postAs(app, team.cookies.pi, '/api/v1/plans', {
      labId: team.lab.id,
      projectId: defaults.projectId,
      name: 'Next outgrowth experiment',
      source: { analysisId, versionNo: 1 },
      inputs: { ...defaults.inputs, difference: 10, costPerUnit: 250, costPerObs: 2 },
      // A result sent by a client is not a field of the request and is ignored.
      result: { unitsPerArm: 1 },
    })
    expect(res.status, JSON.stringify(res.body)).toBe(201)
    const plan = Plan.parse(res.body.data)
    planId = plan.id
    expect(plan.project?.id).toBe(defaults.projectId)
    expect(plan.source).toMatchObject({ analysisId, versionNo: 1 })
    const preview = await postAs(app, team.cookies.pi, '/api/v1/plans/preview', { inputs: plan.inputs })
    expect({ ...plan.result, engineVersion: '' }).toEqual({ ...preview.body.data, engineVersion: '' })
    expect(plan.result.unitsPerArm).toBeGreaterThanOrEqual(2)
    expect(plan.permissions.write).toBe(true)
  })

  it('lets every member read and list, and only scientists and PIs write', async () => {
    const read = await getAs(app, team.cookies.biostatistician, `/api/v1/plans/${planId}`)
    expect(read.status).toBe(200)
    expect(read.body.data.permissions.write).toBe(false)
    const list = await getAs(app, team.cookies.biostatistician, `/api/v1/plans?labId=${team.lab.id}`)
    expect(list.body.data.map((p: Plan) => p.id)).toContain(planId)
    const rename = await patchAs(app, team.cookies.biostatistician, `/api/v1/plans/${planId}`, { name: 'x' })
    expect(rename.status).toBe(403)
    const create = await postAs(app, team.cookies.biostatistician, '/api/v1/plans', {
      labId: team.lab.id,
      name: 'nope',
      inputs: clusterPowerExample,
    })
    expect(create.status).toBe(403)
    // The refusal is about plans, not about uploading.
    for (const refusal of [rename, create])
      expect(refusal.body.error.message).toBe(
        `Saving, changing and deleting plans needs the role scientist or PI in ${team.lab.name}.`,
      )
  })

  it('hides plans of other labs (404) and keeps them out of lists', async () => {
    expect((await getAs(app, outsider.cookies.pi, `/api/v1/plans/${planId}`)).status).toBe(404)
    expect((await patchAs(app, outsider.cookies.pi, `/api/v1/plans/${planId}`, { name: 'x' })).status).toBe(
      404,
    )
    expect((await deleteAs(app, outsider.cookies.pi, `/api/v1/plans/${planId}`)).status).toBe(404)
    const list = await getAs(app, outsider.cookies.pi, '/api/v1/plans')
    expect(list.body.data.map((p: Plan) => p.id)).not.toContain(planId)
    const intoOther = await postAs(app, outsider.cookies.pi, '/api/v1/plans', {
      labId: outsider.lab.id,
      name: 'Borrowed',
      source: { analysisId, versionNo: 1 },
      inputs: clusterPowerExample,
    })
    expect(intoOther.status).toBe(404)
  })

  it('moves a plan between projects of its lab, never into another lab', async () => {
    const detach = await patchAs(app, team.cookies.scientist, `/api/v1/plans/${planId}`, {
      projectId: null,
      name: 'Renamed',
    })
    expect(detach.status).toBe(200)
    expect(detach.body.data).toMatchObject({ project: null, name: 'Renamed' })
    const project = await postAs(app, outsider.cookies.pi, '/api/v1/projects', {
      labId: outsider.lab.id,
      name: 'Theirs',
    })
    const foreign = await patchAs(app, team.cookies.scientist, `/api/v1/plans/${planId}`, {
      projectId: project.body.data.id,
    })
    expect(foreign.status).toBe(404)
  })

  it('saves a typed-in plan without a source and deletes it', async () => {
    const res = await postAs(app, team.cookies.scientist, '/api/v1/plans', {
      labId: team.lab.id,
      name: 'Typed numbers',
      inputs: clusterPowerExample,
    })
    expect(res.status).toBe(201)
    expect(res.body.data).toMatchObject({
      source: null,
      project: null,
      result: { unitsPerArm: 16, obsPerUnit: 10 },
    })
    expect((await deleteAs(app, team.cookies.scientist, `/api/v1/plans/${res.body.data.id}`)).status).toBe(
      204,
    )
    expect((await getAs(app, team.cookies.scientist, `/api/v1/plans/${res.body.data.id}`)).status).toBe(404)
  })
})
