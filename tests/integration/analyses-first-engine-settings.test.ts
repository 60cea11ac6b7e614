import { createHash } from 'node:crypto'
import request from 'supertest'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { canonicalJson } from '../../shared/canonical/canonical-json'
import { AnalysisDetail, AnalysisVersionDetail, type ChartData } from '../../shared/schemas/analyses'
import { SharedAnalysis } from '../../shared/schemas/share-links'
import { db } from '../../server/db'
import { closeConnections, createTestApp } from '../support/api'
import { createUser } from '../support/factories'
import { finishedAnalysis, neuriteCsv, taggedDataset } from './analyses-support'
import { getAs, postAs, signedInTeam } from './datasets-support'

/**
 * Versions stored by engine 0.1 keep their settings JSON as written then ({ condition,
 * reference: label, errorBar }): they are listed and read in today's shape, a new version can be
 * made from them, and a sign-off over one stays valid, because the sign-off hash covers the
 * stored JSON as stored, never a re-parsed form.
 */
const app = createTestApp()

let team: Awaited<ReturnType<typeof signedInTeam>>
let analysisId: number
let firstEngineVersion: { id: number; sha256: string; result: unknown }

/** Exactly what engine 0.1 wrote into analysis_versions.settings. */
const FIRST_ENGINE_SETTINGS = {
  response: 'neurite_length_um',
  condition: 'treatment',
  levels: ['mouse'],
  reference: 'vehicle',
  errorBar: 'sem',
  bootstrap: { enabled: false, resamples: 2000, seed: '1' },
}

/** The sign-off recipe written out independently of the server's code (server/services/sign-off-hash.ts). */
function expectedHash(datasetSha256: string, settings: unknown, engineVersion: string, result: unknown) {
  const text = [
    'nestwise-sign-off-v1',
    datasetSha256,
    canonicalJson(settings),
    engineVersion,
    canonicalJson(result),
  ].join('\n')
  return createHash('sha256').update(text, 'utf8').digest('hex')
}

beforeAll(async () => {
  team = await signedInTeam(app)
  const dataset = await taggedDataset(
    app,
    team.cookies.scientist,
    team.lab.id,
    neuriteCsv({ seed: 'first-engine', mice: 8 }),
  )
  analysisId = await finishedAnalysis(app, team.cookies.scientist, dataset.id, 'Stored by engine 0.1')
  // Version 2 as engine 0.1 left it: its settings JSON and engine version, a finished result.
  const v1 = await db('analysis_versions')
    .where({ analysis_id: analysisId, version_no: 1 })
    .first('dataset_version_id', 'dataset_sha256', 'result', 'chart')
  const [row] = await db('analysis_versions')
    .insert({
      analysis_id: analysisId,
      version_no: 2,
      dataset_version_id: v1.dataset_version_id,
      dataset_sha256: v1.dataset_sha256,
      settings: JSON.stringify(FIRST_ENGINE_SETTINGS),
      exclusions: JSON.stringify([]),
      engine_version: '0.1.0',
      created_by: team.scientist.id,
      status: 'done',
      progress: JSON.stringify({ stage: 'done', fraction: 1 }),
      result: JSON.stringify(v1.result),
      chart: JSON.stringify(asFirstEngineChart(v1.chart)),
      started_at: db.fn.now(),
      finished_at: db.fn.now(),
    })
    .returning('id')
  firstEngineVersion = { id: row.id, sha256: v1.dataset_sha256, result: v1.result }
}, 120_000)

afterAll(closeConnections)

/** The chart as engine 0.1 stored it: bars as { mean, sem, ci95 } instead of the interval shape. */
function asFirstEngineChart(chart: ChartData) {
  const bars = ({ estimate, se, ci, ...rest }: { estimate: number; se: number; ci: [number, number] }) => ({
    ...rest,
    mean: estimate,
    sem: se,
    ci95: ci,
  })
  return {
    ...chart,
    conditions: chart.conditions.map((c) => ({ ...c, naive: bars(c.naive), nested: bars(c.nested) })),
  }
}

const UPGRADED = {
  response: 'neurite_length_um',
  conditions: ['treatment'],
  covariates: [],
  levels: ['mouse'],
  reference: { treatment: 'vehicle' },
  bootstrap: { enabled: false, resamples: 2000, seed: '1' },
  // Stored before families: a normal response.
  family: 'gaussian',
  trials: null,
  positive: null,
}

describe('settings stored by engine 0.1', () => {
  it('are listed and read in today’s shape, while the stored JSON stays as written', async () => {
    const detail = AnalysisDetail.parse(
      (await getAs(app, team.cookies.biostatistician, `/api/v1/analyses/${analysisId}`)).body.data,
    )
    expect(detail.versions.map((v) => v.versionNo)).toEqual([2, 1])
    expect(detail.versions[0].settings).toEqual(UPGRADED)
    const res = await getAs(app, team.cookies.biostatistician, `/api/v1/analyses/${analysisId}/versions/2`)
    expect(res.status).toBe(200)
    const version = AnalysisVersionDetail.parse(res.body.data)
    expect(version.settings).toEqual(UPGRADED)
    expect(version.engineVersion).toBe('0.1.0')
    expect(version.result).toEqual(firstEngineVersion.result)
    const stored = await db('analysis_versions').where({ id: firstEngineVersion.id }).first('settings')
    expect(stored.settings).toEqual(FIRST_ENGINE_SETTINGS)
  })

  it('come with their stored chart read in the one interval shape', async () => {
    const res = await getAs(app, team.cookies.biostatistician, `/api/v1/analyses/${analysisId}/versions/2`)
    const [first] = res.body.data.chart.conditions
    expect(Object.keys(first.naive).sort()).toEqual(['ci', 'df', 'estimate', 'sd', 'se'])
    expect(Object.keys(first.nested).sort()).toEqual(['ci', 'df', 'estimate', 'nUnits', 'sd', 'se'])
    const stored = await db('analysis_versions').where({ id: firstEngineVersion.id }).first('chart')
    expect(Object.keys(stored.chart.conditions[0].naive)).toContain('ci95')
  })

  it('keep a sign-off valid: the hash covers the stored JSON, with its errorBar and single condition', async () => {
    const requested = await postAs(
      app,
      team.cookies.scientist,
      `/api/v1/analyses/${analysisId}/versions/2/review-requests`,
      { reviewerId: team.biostatistician.id },
    )
    expect(requested.status, JSON.stringify(requested.body)).toBe(201)
    const decided = await postAs(
      app,
      team.cookies.biostatistician,
      `/api/v1/review-requests/${requested.body.data.id}/decision`,
      { decision: 'signed_off' },
    )
    expect(decided.status, JSON.stringify(decided.body)).toBe(200)
    const hash = decided.body.data.signOff.coveringSignOff.hash
    expect(hash).toBe(
      expectedHash(firstEngineVersion.sha256, FIRST_ENGINE_SETTINGS, '0.1.0', firstEngineVersion.result),
    )
    // The hash over the upgraded form would differ: the stored form is what counts.
    expect(hash).not.toBe(
      expectedHash(firstEngineVersion.sha256, UPGRADED, '0.1.0', firstEngineVersion.result),
    )

    // A sign-off made before the upgrade (same recipe, computed then) reads as valid now.
    const earlier = await createUser({ memberships: [{ lab: team.lab, role: 'biostatistician' }] })
    await db('sign_offs').insert({
      analysis_version_id: firstEngineVersion.id,
      signed_by: earlier.id,
      hash: expectedHash(
        firstEngineVersion.sha256,
        FIRST_ENGINE_SETTINGS,
        '0.1.0',
        firstEngineVersion.result,
      ),
    })
    const state = await getAs(app, team.cookies.pi, `/api/v1/analyses/${analysisId}/versions/2/sign-off`)
    expect(state.status).toBe(200)
    // Both sign-offs of version 2 check out: none is listed as tampered.
    expect(state.body.data).toMatchObject({
      signedOff: true,
      coveringSignOff: { versionNo: 2, hashValid: true },
      tampered: [],
    })
    expect(await db('sign_offs').where({ analysis_version_id: firstEngineVersion.id })).toHaveLength(2)
  })

  it('are shown in today’s shape through a share link', async () => {
    const link = await postAs(app, team.cookies.pi, `/api/v1/analyses/${analysisId}/share-links`, {
      versionNo: 2,
    })
    expect(link.status, JSON.stringify(link.body)).toBe(201)
    const res = await request(app).get(`/api/v1/shared/${link.body.data.token}`)
    expect(res.status).toBe(200)
    expect(SharedAnalysis.parse(res.body.data).settings).toEqual(UPGRADED)
  })

  it('are the base of a new version, which is stored in today’s shape', async () => {
    const res = await postAs(app, team.cookies.scientist, `/api/v1/analyses/${analysisId}/versions`, {
      settings: { bootstrap: { seed: 'next' } },
    })
    expect(res.status, JSON.stringify(res.body)).toBe(201)
    const next = { ...UPGRADED, bootstrap: { ...UPGRADED.bootstrap, seed: 'next' } }
    expect(res.body.data).toMatchObject({ versionNo: 3, settings: next })
    const stored = await db('analysis_versions')
      .where({ analysis_id: analysisId, version_no: 3 })
      .first('settings')
    expect(stored.settings).toEqual(next)
  })
})
