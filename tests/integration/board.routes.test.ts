import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { db } from '../../server/db'
import { closeConnections, createTestApp } from '../support/api'
import { finishQueuedVersion } from '../support/finished-version'
import { finishedAnalysis, neuriteCsv, taggedDataset } from './analyses-support'
import { getAs, postAs, signedInTeam } from './datasets-support'

const app = createTestApp()
let team: Awaited<ReturnType<typeof signedInTeam>>
let outsider: Awaited<ReturnType<typeof signedInTeam>>
const ids: Record<'thin' | 'wide' | 'byPi', number> = { thin: 0, wide: 0, byPi: 0 }
let wideProjectId: number

interface Row {
  analysisId: number
  name: string
  project: { id: number }
  author: { id: number }
  versionNo: number
  effectiveN: number | null
  designEffect: number | null
  unitsPerCondition: { condition: string; nUnits: number }[]
  minUnitsPerCondition: number | null
  warningCount: number
  reviewStatus: string
}

const board = async (query = '') => {
  const res = await getAs(app, team.cookies.pi, `/api/v1/labs/${team.lab.id}/board${query}`)
  expect(res.status, JSON.stringify(res.body)).toBe(200)
  return res.body.data as { rows: Row[]; projects: { id: number }[]; authors: { id: number }[] }
}
const row = (rows: Row[], id: number) => rows.find((r) => r.analysisId === id)!

const analysis = (cookie: string, datasetId: number, name: string) =>
  finishedAnalysis(app, cookie, datasetId, name)

beforeAll(async () => {
  ;[team, outsider] = await Promise.all([signedInTeam(app), signedInTeam(app)])
  // 4 mice (2 per arm) versus 12 mice (6 per arm): invented tables.
  const thin = await taggedDataset(
    app,
    team.cookies.scientist,
    team.lab.id,
    neuriteCsv({ seed: 'board-thin', mice: 4 }),
    ['mouse'],
    'thin',
  )
  const wideUpload = await taggedDataset(
    app,
    team.cookies.pi,
    team.lab.id,
    neuriteCsv({ seed: 'board-wide', mice: 12 }),
    ['mouse'],
    'wide',
  )
  ids.thin = await analysis(team.cookies.scientist, thin.id, 'Two mice per arm')
  ids.wide = await analysis(team.cookies.scientist, wideUpload.id, 'Six mice per arm')
  ids.byPi = await analysis(team.cookies.pi, wideUpload.id, 'PI’s look')
  // A second project for the wide table, so the project filter has something to tell apart.
  const [project] = await db('projects')
    .insert({ lab_id: team.lab.id, name: `Board B ${Date.now()}`, created_by: team.pi.id })
    .returning('id')
  await db('datasets').where({ id: wideUpload.id }).update({ project_id: project.id })
  wideProjectId = project.id
}, 120_000)

afterAll(closeConnections)

describe('the lab board', () => {
  it('lists every analysis of the lab with units per condition, effective n, design effect and warnings', async () => {
    const { rows } = await board()
    expect(rows.map((r) => r.analysisId).sort()).toEqual(Object.values(ids).sort())
    const thin = row(rows, ids.thin)
    // Units per arm follow from the invented table: mice 1..4, odd → vehicle, even → NW-117 (by construction).
    expect(thin.unitsPerCondition.map((u) => u.nUnits).sort()).toEqual([2, 2])
    expect(thin.minUnitsPerCondition).toBe(2)
    expect(row(rows, ids.wide).minUnitsPerCondition).toBe(6)
    const stored = await db('analysis_versions')
      .where({ analysis_id: ids.wide, version_no: 1 })
      .first('result')
    expect(row(rows, ids.wide).effectiveN).toBeCloseTo(stored.result.effectiveN, 10)
    expect(row(rows, ids.wide).designEffect).toBeCloseTo(stored.result.designEffect, 10)
    expect(row(rows, ids.wide).warningCount).toBe(stored.result.warnings.length)
    expect(thin.reviewStatus).toBe('not_requested')
  })

  it('follows review state: in review, signed off, then not covered by a newer version', async () => {
    const asked = await postAs(
      app,
      team.cookies.scientist,
      `/api/v1/analyses/${ids.wide}/versions/1/review-requests`,
      {
        reviewerId: team.biostatistician.id,
      },
    )
    expect(row((await board()).rows, ids.wide).reviewStatus).toBe('in_review')
    await postAs(
      app,
      team.cookies.biostatistician,
      `/api/v1/review-requests/${asked.body.data.id}/decision`,
      { decision: 'signed_off' },
    )
    expect(row((await board()).rows, ids.wide).reviewStatus).toBe('signed_off')
    const v2 = await postAs(app, team.cookies.scientist, `/api/v1/analyses/${ids.wide}/versions`, {
      settings: { reference: { treatment: 'NW-117' } },
    })
    await finishQueuedVersion(ids.wide, v2.body.data.versionNo)
    const after = row((await board()).rows, ids.wide)
    expect(after.versionNo).toBe(2)
    expect(after.reviewStatus).toBe('not_covered')
    expect((await board('?reviewStatus=not_covered')).rows.map((r) => r.analysisId)).toEqual([ids.wide])
  })

  it('filters by project, person and date', async () => {
    const byProject = await board(`?projectId=${wideProjectId}`)
    expect(byProject.rows.map((r) => r.analysisId).sort()).toEqual([ids.wide, ids.byPi].sort())
    expect(byProject.projects.length).toBe(2)
    const byPerson = await board(`?authorId=${team.pi.id}`)
    expect(byPerson.rows.map((r) => r.analysisId)).toEqual([ids.byPi])
    expect(
      (await board(`?from=${encodeURIComponent(new Date(Date.now() + 60_000).toISOString())}`)).rows,
    ).toEqual([])
    expect(
      (await board(`?to=${encodeURIComponent(new Date(Date.now() + 60_000).toISOString())}`)).rows,
    ).toHaveLength(3)
    expect(
      (await getAs(app, team.cookies.pi, `/api/v1/labs/${team.lab.id}/board?reviewStatus=maybe`)).status,
    ).toBe(400)
  })

  it('is the lab’s own: other labs get 404 and see nothing of it', async () => {
    expect((await getAs(app, outsider.cookies.pi, `/api/v1/labs/${team.lab.id}/board`)).status).toBe(404)
    const theirs = await getAs(app, outsider.cookies.pi, `/api/v1/labs/${outsider.lab.id}/board`)
    expect(theirs.body.data.rows).toEqual([])
  })
})
