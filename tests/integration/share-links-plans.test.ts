import request from 'supertest'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { db } from '../../server/db'
import { PlanRecommendation, type Plan } from '../../shared/schemas/plans'
import { SharedAnalysis } from '../../shared/schemas/share-links'
import { closeConnections, createTestApp } from '../support/api'
import { finishQueuedVersion } from '../support/finished-version'
import { finishedAnalysis, neuriteCsv, taggedDataset } from './analyses-support'
import { deleteAs, getAs, postAs, signedInTeam } from './datasets-support'

/**
 * Plans on the read-only link: a link to one analysis version carries the plans saved from exactly
 * that version (not from its other versions, other analyses or typed-in numbers), in a shape with
 * nothing about who made them; a link that no longer works still shows nothing.
 */
const app = createTestApp()
let team: Awaited<ReturnType<typeof signedInTeam>>
let outsider: Awaited<ReturnType<typeof signedInTeam>>
let sharedId: number
let otherId: number
const plans: Record<string, Plan> = {}

const typedInputs = {
  icc: 0.2,
  spread: { kind: 'total', sdTotal: 25 },
  difference: 10,
  costPerUnit: 300,
  costPerObs: 2,
}

async function savePlan(
  key: string,
  source: { analysisId: number; versionNo: number } | null,
  inputs: object = typedInputs,
) {
  const res = await postAs(app, team.cookies.scientist, '/api/v1/plans', {
    labId: team.lab.id,
    name: `${key} plan`,
    source,
    inputs,
  })
  expect(res.status, JSON.stringify(res.body)).toBe(201)
  plans[key] = res.body.data as Plan
}

async function linkTo(analysisId: number, versionNo = 1) {
  const res = await postAs(app, team.cookies.pi, `/api/v1/analyses/${analysisId}/share-links`, { versionNo })
  expect(res.status, JSON.stringify(res.body)).toBe(201)
  return res.body.data as { id: number; token: string }
}

const open = (token: string) => request(app).get(`/api/v1/shared/${token}`)

async function sharedPlanNames(token: string): Promise<string[]> {
  const res = await open(token)
  expect(res.status, JSON.stringify(res.body)).toBe(200)
  return SharedAnalysis.parse(res.body.data).plans.map((p) => p.name)
}

beforeAll(async () => {
  ;[team, outsider] = await Promise.all([signedInTeam(app), signedInTeam(app)])
  const dataset = await taggedDataset(
    app,
    team.cookies.scientist,
    team.lab.id,
    neuriteCsv({ seed: 'shared-plans', mice: 8 }),
  )
  sharedId = await finishedAnalysis(app, team.cookies.scientist, dataset.id, 'Shared with plans')
  otherId = await finishedAnalysis(app, team.cookies.scientist, dataset.id, 'Other analysis')
  const second = await postAs(app, team.cookies.scientist, `/api/v1/analyses/${sharedId}/versions`, {
    settings: { reference: { treatment: 'NW-117' } },
  })
  expect(second.status, JSON.stringify(second.body)).toBe(201)
  await finishQueuedVersion(sharedId, 2)

  const defaults = await getAs(
    app,
    team.cookies.scientist,
    `/api/v1/plans/defaults?analysisId=${sharedId}&versionNo=1`,
  )
  expect(defaults.status).toBe(200)
  // Saved one after another so that created_at orders them.
  await savePlan(
    'first',
    { analysisId: sharedId, versionNo: 1 },
    { ...defaults.body.data.inputs, difference: 10 },
  )
  await savePlan('second', { analysisId: sharedId, versionNo: 1 })
  await savePlan('version-two', { analysisId: sharedId, versionNo: 2 })
  await savePlan('other-analysis', { analysisId: otherId, versionNo: 1 })
  await savePlan('typed-in', null)
}, 120_000)

afterAll(closeConnections)

describe('plans on a read-only link', () => {
  it('carries the plans saved from the shared version, oldest first, and none from anywhere else', async () => {
    const link = await linkTo(sharedId, 1)
    expect(await sharedPlanNames(link.token)).toEqual(['first plan', 'second plan'])
    expect(await sharedPlanNames((await linkTo(sharedId, 2)).token)).toEqual(['version-two plan'])
    expect(await sharedPlanNames((await linkTo(otherId, 1)).token)).toEqual(['other-analysis plan'])
  })

  it('gives a reviewer the inputs and the recommendation, nothing about people, labs or ids', async () => {
    const res = await open((await linkTo(sharedId, 1)).token)
    const [first] = res.body.data.plans
    expect(Object.keys(first).sort()).toEqual(['createdAt', 'inputs', 'name', 'result'])
    expect(Object.keys(first.result).sort()).toEqual(Object.keys(PlanRecommendation.shape).sort())
    expect(first.inputs).toEqual(plans.first.inputs)
    expect(first.createdAt).toBe(plans.first.createdAt)
    const saved = plans.first.result
    expect(first.result).toEqual(
      Object.fromEntries(
        Object.keys(PlanRecommendation.shape).map((key) => [key, saved[key as keyof typeof saved]]),
      ),
    )
    const body = JSON.stringify(res.body.data.plans)
    for (const secret of [team.scientist.email, team.scientist.name, team.lab.name])
      expect(body).not.toContain(secret)
    for (const key of ['"id"', '"labId"', '"createdBy"', '"project"', '"powerCurves"'])
      expect(body).not.toContain(key)
  })

  it('shows an empty list once the only plan of a version is deleted', async () => {
    const link = await linkTo(otherId, 1)
    const gone = await deleteAs(app, team.cookies.scientist, `/api/v1/plans/${plans['other-analysis'].id}`)
    expect(gone.status).toBe(204)
    expect(await sharedPlanNames(link.token)).toEqual([])
  })

  it('still refuses an expired or withdrawn link, plans and all', async () => {
    const expired = await linkTo(sharedId, 1)
    await db('share_links')
      .where({ id: expired.id })
      .update({ expires_at: db.raw(`now() - interval '1 second'`) })
    const revoked = await linkTo(sharedId, 1)
    expect(await sharedPlanNames(revoked.token)).toHaveLength(2)
    const withdraw = await deleteAs(
      app,
      team.cookies.pi,
      `/api/v1/analyses/${sharedId}/share-links/${revoked.id}`,
    )
    expect(withdraw.status).toBe(200)
    for (const token of [expired.token, revoked.token]) {
      const res = await open(token)
      expect(res.status).toBe(404)
      expect(res.body.error.message).toMatch(/does not work/)
      expect(JSON.stringify(res.body)).not.toContain('first plan')
    }
  })
})

describe('plans of one analysis for the printed report', () => {
  const list = async (cookie: string, query: string) => {
    const res = await getAs(app, cookie, `/api/v1/plans?${query}`)
    expect(res.status, JSON.stringify(res.body)).toBe(200)
    return (res.body.data as Plan[]).map((p) => p.name).sort()
  }

  it('lists the plans of one version, or of every version of the analysis, for lab members only', async () => {
    expect(await list(team.cookies.biostatistician, `analysisId=${sharedId}&versionNo=1`)).toEqual([
      'first plan',
      'second plan',
    ])
    expect(await list(team.cookies.biostatistician, `analysisId=${sharedId}`)).toEqual([
      'first plan',
      'second plan',
      'version-two plan',
    ])
    expect(await list(outsider.cookies.pi, `analysisId=${sharedId}&versionNo=1`)).toEqual([])
  })

  it('refuses a version number without its analysis', async () => {
    const res = await getAs(app, team.cookies.pi, '/api/v1/plans?versionNo=1')
    expect(res.status).toBe(400)
    expect(res.body.error.code).toBe('INVALID_PAYLOAD')
  })
})
