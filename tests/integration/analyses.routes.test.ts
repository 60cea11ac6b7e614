import Papa from 'papaparse'
import request from 'supertest'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import {
  AnalysisDefaults,
  AnalysisDetail,
  AnalysisListItem,
  AnalysisVersionDetail,
  AnalysisVersionSummary,
} from '../../shared/schemas/analyses'
import { ENGINE_VERSION } from '../../shared/stats/engine-version'
import { db } from '../../server/db'
import { startAnalysisRunner, stopAnalysisRunner } from '../../server/jobs/analysis-runner'
import { appWriteHeaders, closeConnections, createTestApp } from '../support/api'
import { pollUntilFinished, neuriteCsv, taggedDataset } from './analyses-support'
import { deleteAs, getAs, patchAs, postAs, signedInTeam, uploadVersion } from './datasets-support'

const app = createTestApp()

let team: Awaited<ReturnType<typeof signedInTeam>>
let outsider: Awaited<ReturnType<typeof signedInTeam>>
let dataset: Awaited<ReturnType<typeof taggedDataset>>

beforeAll(async () => {
  startAnalysisRunner({ pollMs: 100, reapEveryMs: 500 })
  ;[team, outsider] = await Promise.all([signedInTeam(app), signedInTeam(app)])
  dataset = await taggedDataset(app, team.cookies.scientist, team.lab.id, neuriteCsv({ seed: 'routes-main' }))
})

afterAll(async () => {
  await stopAnalysisRunner()
  await closeConnections()
})

const createAnalysis = (cookie: string, body: object) => postAs(app, cookie, '/api/v1/analyses', body)

describe('creating and running an analysis', () => {
  let analysisId: number

  it('queues version 1 with settings from the tagging, runs it off the request, and reports progress on the way', async () => {
    const res = await createAnalysis(team.cookies.scientist, {
      datasetId: dataset.id,
      settings: { bootstrap: { enabled: true, resamples: 5000, seed: 'routes' } },
    })
    expect(res.status, JSON.stringify(res.body)).toBe(201)
    const detail = AnalysisDetail.parse(res.body.data)
    analysisId = detail.id
    expect(detail).toMatchObject({
      name: 'neurites – neurite_length_um',
      labId: team.lab.id,
      dataset: { id: dataset.id },
      versionCount: 1,
      permissions: { run: true, rename: true },
    })
    const [v1] = detail.versions
    expect(v1.settings).toEqual({
      response: 'neurite_length_um',
      conditions: ['treatment'],
      covariates: [],
      levels: ['mouse'],
      reference: {},
      bootstrap: { enabled: true, resamples: 5000, seed: 'routes' },
      family: 'gaussian',
      trials: null,
      positive: null,
    })
    // Answered before the run finished: the engine never runs on the request.
    expect(['queued', 'running']).toContain(v1.status)

    const { final, seen } = await pollUntilFinished(app, team.cookies.biostatistician, analysisId, 1)
    expect(final.status, JSON.stringify(final)).toBe('done')
    expect(final.progress).toEqual({ stage: 'done', fraction: 1 })
    // At least one state between queued and done was visible to a poller.
    expect(seen.some((s) => s.status === 'running')).toBe(true)
    const order = ['queued', 'reading', 'fitting', 'comparisons', 'bootstrap', 'charts', 'saving', 'done']
    const stages = seen.map((s) => order.indexOf(s.progress.stage))
    expect(stages).toEqual([...stages].sort((a, b) => a - b))
  })

  it('stores the result with the settings, the dataset checksum and the engine version, and serves it again as stored', async () => {
    const res = await getAs(app, team.cookies.biostatistician, `/api/v1/analyses/${analysisId}/versions/1`)
    expect(res.status).toBe(200)
    const version = AnalysisVersionDetail.parse(res.body.data)
    expect(version.datasetVersion).toEqual({
      id: dataset.latestVersion.id,
      versionNo: 1,
      sha256: dataset.latestVersion.sha256,
    })
    expect(version.engineVersion).toBe(ENGINE_VERSION)
    expect(version.result!.engine.version).toBe(ENGINE_VERSION)
    expect(version.runMs).toBeGreaterThan(0)
    expect(version.result).toMatchObject({
      response: 'neurite_length_um',
      condition: 'treatment',
      conditionLevel: 'mouse',
      nDropped: 0,
    })
    expect(version.result!.levels[0]).toMatchObject({ name: 'mouse', nUnits: 10 })
    expect(version.result!.comparisons.bootstrap).toMatchObject({ resamples: 5000, seed: 'routes' })
    // Chart data: every neuron shown (fewer than the limit), each mouse listed with its condition.
    const chart = version.chart!
    expect(chart.points.nShown).toBe(version.result!.nObs)
    expect(chart.unitLevels[0].units).toHaveLength(10)
    expect(chart.conditions.map((c) => c.condition)).toEqual(['vehicle', 'NW-117'])
    const again = await getAs(app, team.cookies.scientist, `/api/v1/analyses/${analysisId}/versions/1`)
    expect(again.body.data).toEqual(res.body.data)
  })

  it('lists the analysis with its headline numbers for every member, filtered by lab, project and dataset', async () => {
    const list = await getAs(app, team.cookies.biostatistician, `/api/v1/analyses?datasetId=${dataset.id}`)
    expect(list.status).toBe(200)
    const items = list.body.data.map((item: unknown) => AnalysisListItem.parse(item))
    expect(items.map((i: AnalysisListItem) => i.id)).toEqual([analysisId])
    const version = (await getAs(app, team.cookies.scientist, `/api/v1/analyses/${analysisId}/versions/1`))
      .body.data as AnalysisVersionDetail
    expect(items[0].latestVersion).toMatchObject({
      versionNo: 1,
      status: 'done',
      headline: {
        nObs: version.result!.nObs,
        effectiveN: version.result!.effectiveN,
        designEffect: version.result!.designEffect,
        minUnitsPerCondition: 5,
        warningCount: version.result!.warnings.length,
      },
    })
    const project = (
      await getAs(
        app,
        team.cookies.pi,
        `/api/v1/analyses?projectId=${items[0].project.id}&labId=${team.lab.id}`,
      )
    ).body.data
    expect(project.map((i: AnalysisListItem) => i.id)).toContain(analysisId)
    const otherLab = (await getAs(app, team.cookies.pi, `/api/v1/analyses?labId=${outsider.lab.id}`)).body
      .data
    expect(otherLab).toEqual([])
  })

  it('makes version 2 from changed settings and leaves version 1 exactly as it was', async () => {
    const before = (await getAs(app, team.cookies.scientist, `/api/v1/analyses/${analysisId}/versions/1`))
      .body.data
    const res = await postAs(app, team.cookies.pi, `/api/v1/analyses/${analysisId}/versions`, {
      settings: { reference: { treatment: 'NW-117' }, bootstrap: { enabled: false } },
    })
    expect(res.status, JSON.stringify(res.body)).toBe(201)
    const v2 = AnalysisVersionSummary.parse(res.body.data)
    expect(v2.versionNo).toBe(2)
    expect(v2.settings).toMatchObject({
      reference: { treatment: 'NW-117' },
      levels: ['mouse'],
      bootstrap: { enabled: false, resamples: 5000, seed: 'routes' },
    })
    const { final } = await pollUntilFinished(app, team.cookies.scientist, analysisId, 2)
    expect(final.status).toBe('done')
    const after = (await getAs(app, team.cookies.scientist, `/api/v1/analyses/${analysisId}/versions/1`)).body
      .data
    expect(after).toEqual(before)
    const second = (await getAs(app, team.cookies.scientist, `/api/v1/analyses/${analysisId}/versions/2`))
      .body.data as AnalysisVersionDetail
    expect(second.result!.reference).toBe('NW-117')
    expect(second.result!.comparisons.bootstrap).toBeNull()
    // Same data, other reference: the contrast flips sign (the model is the same).
    const c1 = (before as AnalysisVersionDetail).result!.comparisons.mixedModel!.contrasts[0]
    const c2 = second.result!.comparisons.mixedModel!.contrasts[0]
    expect(c2.estimate).toBeCloseTo(-c1.estimate, 8)
    expect(c2.p).toBeCloseTo(c1.p, 8)

    const detail = AnalysisDetail.parse(
      (await getAs(app, team.cookies.scientist, `/api/v1/analyses/${analysisId}`)).body.data,
    )
    expect(detail.versions.map((v) => v.versionNo)).toEqual([2, 1])
  })

  it('refuses a version identical to the newest (409), also when the body only sends an error bar (no longer a setting)', async () => {
    const same = await postAs(app, team.cookies.scientist, `/api/v1/analyses/${analysisId}/versions`, {})
    expect(same.status).toBe(409)
    expect(same.body.error.code).toBe('CONFLICT')
    expect(same.body.error.details).toEqual({ versionNo: 2 })
    const errorBar = await postAs(app, team.cookies.scientist, `/api/v1/analyses/${analysisId}/versions`, {
      settings: { errorBar: 'ci95' },
    })
    expect(errorBar.status).toBe(409)
    const detail = AnalysisDetail.parse(
      (await getAs(app, team.cookies.scientist, `/api/v1/analyses/${analysisId}`)).body.data,
    )
    expect(detail.versionCount).toBe(2)
  })

  it('keeps finished versions unchangeable in the database itself', async () => {
    const { id } = await db('analysis_versions').where({ analysis_id: analysisId, version_no: 1 }).first('id')
    await expect(
      db('analysis_versions')
        .where({ id })
        .update({ settings: JSON.stringify({ response: 'x' }) }),
    ).rejects.toThrow(/finished and cannot change/)
  })

  it('renames for scientists and PIs', async () => {
    const res = await patchAs(app, team.cookies.scientist, `/api/v1/analyses/${analysisId}`, {
      name: 'Outgrowth, vehicle vs NW-117',
    })
    expect(res.status).toBe(200)
    expect(res.body.data.name).toBe('Outgrowth, vehicle vs NW-117')
  })

  it('records creation, new versions and renames in the audit log', async () => {
    const entries = await db('audit_events')
      .where({ subject_type: 'analysis', subject_id: String(analysisId) })
      .orderBy('id')
      .select('action', 'actor_user_id', 'lab_id')
    expect(entries.map((e) => e.action)).toEqual([
      'analysis.created',
      'analysis.version_created',
      'analysis.renamed',
    ])
    expect(entries[0]).toMatchObject({ actor_user_id: team.scientist.id, lab_id: team.lab.id })
  })
})

describe('exclusions', () => {
  it('records the exclusions active at creation; withdrawing or adding one later never changes a stored version', async () => {
    const data = await taggedDataset(
      app,
      team.cookies.scientist,
      team.lab.id,
      neuriteCsv({ seed: 'exclusions' }),
      ['mouse'],
      'with-exclusions',
    )
    const exclusion = await postAs(
      app,
      team.cookies.scientist,
      `/api/v1/datasets/${data.id}/versions/1/exclusions`,
      {
        kind: 'unit',
        unit: { path: [{ column: 'mouse', value: 'm01' }] },
        reason: 'culture contaminated',
      },
    )
    expect(exclusion.status, JSON.stringify(exclusion.body)).toBe(201)
    const created = await createAnalysis(team.cookies.scientist, { datasetId: data.id })
    const id = created.body.data.id
    expect(created.body.data.versions[0].exclusions).toEqual([
      expect.objectContaining({ kind: 'unit', reason: 'culture contaminated' }),
    ])
    await pollUntilFinished(app, team.cookies.scientist, id, 1)
    const v1 = (await getAs(app, team.cookies.scientist, `/api/v1/analyses/${id}/versions/1`)).body
      .data as AnalysisVersionDetail
    expect(v1.result!.levels[0].nUnits).toBe(9)
    expect(v1.chart!.unitLevels[0].units.map((u) => u.label)).not.toContain('m01')

    const withdrawn = await request(app)
      .delete(`/api/v1/datasets/${data.id}/versions/1/exclusions/${exclusion.body.data.id}`)
      .set(appWriteHeaders)
      .set('Cookie', team.cookies.scientist)
    expect(withdrawn.status).toBe(200)
    const v2 = await postAs(app, team.cookies.scientist, `/api/v1/analyses/${id}/versions`, {})
    expect(v2.status, JSON.stringify(v2.body)).toBe(201)
    expect(v2.body.data.exclusions).toEqual([])
    await pollUntilFinished(app, team.cookies.scientist, id, 2)
    const after = (await getAs(app, team.cookies.scientist, `/api/v1/analyses/${id}/versions/2`)).body
      .data as AnalysisVersionDetail
    expect(after.result!.levels[0].nUnits).toBe(10)
    expect((await getAs(app, team.cookies.scientist, `/api/v1/analyses/${id}/versions/1`)).body.data).toEqual(
      v1,
    )
  })
})

describe('settings checks', () => {
  it('answers 400 naming an unknown column', async () => {
    const res = await createAnalysis(team.cookies.scientist, {
      datasetId: dataset.id,
      settings: { response: 'soma_area' },
    })
    expect(res.status).toBe(400)
    expect(res.body.error.code).toBe('INVALID_PAYLOAD')
    expect(res.body.error.message).toContain('soma_area')
    expect(res.body.error.details.issues).toEqual([
      { path: 'settings.response', message: expect.stringContaining('“soma_area”') },
    ])
    const level = await createAnalysis(team.cookies.scientist, {
      datasetId: dataset.id,
      settings: { levels: ['lab', 'cage'] },
    })
    expect(level.status).toBe(400)
    expect(level.body.error.details.issues[0].path).toBe('settings.levels.1')
  })

  it('answers 400 for a reference that is not a label of its factor, a column used twice, and too few resamples', async () => {
    const reference = await createAnalysis(team.cookies.scientist, {
      datasetId: dataset.id,
      settings: { reference: { treatment: 'saline' } },
    })
    expect(reference.status).toBe(400)
    expect(reference.body.error.message).toContain('“saline” is not a value of “treatment”')
    expect(reference.body.error.details.issues[0].path).toBe('settings.reference.treatment')
    const notACondition = await createAnalysis(team.cookies.scientist, {
      datasetId: dataset.id,
      settings: { conditions: [], reference: { treatment: 'vehicle' } },
    })
    expect(notACondition.status, JSON.stringify(notACondition.body)).toBe(201)
    expect(notACondition.body.data.versions[0].settings.reference).toEqual({})
    const twice = await createAnalysis(team.cookies.scientist, {
      datasetId: dataset.id,
      settings: { levels: ['treatment'] },
    })
    expect(twice.status).toBe(400)
    const resamples = await createAnalysis(team.cookies.scientist, {
      datasetId: dataset.id,
      settings: { bootstrap: { enabled: true, resamples: 10 } },
    })
    expect(resamples.status).toBe(400)
    expect(resamples.body.error.details.issues[0].path).toBe('settings.bootstrap.resamples')
  })

  it('offers the tagging as defaults, with the columns to choose from', async () => {
    const res = await getAs(
      app,
      team.cookies.biostatistician,
      `/api/v1/analyses/defaults?datasetId=${dataset.id}`,
    )
    expect(res.status).toBe(200)
    const defaults = AnalysisDefaults.parse(res.body.data)
    expect(defaults.settings).toMatchObject({
      response: 'neurite_length_um',
      conditions: ['treatment'],
      covariates: [],
      levels: ['mouse'],
      reference: {},
    })
    expect(defaults.columns).toEqual(['lab', 'mouse', 'treatment', 'neuron', 'neurite_length_um'])
    expect(defaults.numericColumns).toEqual(['neuron', 'neurite_length_um'])
    // Every text column whose labels the profile knows; the numbers are covariate candidates instead.
    expect(Object.keys(defaults.labelsByColumn).sort()).toEqual(['lab', 'mouse', 'treatment'])
    expect(defaults.labelsByColumn.treatment.sort()).toEqual(['NW-117', 'vehicle'])
    expect(defaults.labelsByColumn.lab).toEqual(['Nimbus'])
  })
})

describe('permissions', () => {
  let analysisId: number
  beforeAll(async () => {
    const res = await createAnalysis(team.cookies.pi, {
      datasetId: dataset.id,
      name: 'For permission checks',
    })
    expect(res.status).toBe(201)
    analysisId = res.body.data.id
    await pollUntilFinished(app, team.cookies.pi, analysisId, 1)
  })

  it('hides everything from other labs behind 404', async () => {
    const cookie = outsider.cookies.pi
    for (const path of [
      `/api/v1/analyses/${analysisId}`,
      `/api/v1/analyses/${analysisId}/versions/1`,
      `/api/v1/analyses/${analysisId}/versions/1/status`,
      `/api/v1/analyses/${analysisId}/versions/1/units.csv`,
      `/api/v1/analyses/defaults?datasetId=${dataset.id}`,
    ]) {
      const res = await getAs(app, cookie, path)
      expect(res.status, path).toBe(404)
      expect(res.body.error.code).toBe('NOT_FOUND')
    }
    expect(
      (
        await postAs(app, cookie, `/api/v1/analyses/${analysisId}/versions`, {
          settings: { bootstrap: { seed: 'other' } },
        })
      ).status,
    ).toBe(404)
    expect((await patchAs(app, cookie, `/api/v1/analyses/${analysisId}`, { name: 'mine now' })).status).toBe(
      404,
    )
    expect((await createAnalysis(cookie, { datasetId: dataset.id })).status).toBe(404)
    const list = await getAs(app, cookie, '/api/v1/analyses')
    expect(list.body.data.map((a: { id: number }) => a.id)).not.toContain(analysisId)
  })

  it('lets a biostatistician read and export but not create, run or rename (403)', async () => {
    const cookie = team.cookies.biostatistician
    const detail = await getAs(app, cookie, `/api/v1/analyses/${analysisId}`)
    expect(detail.status).toBe(200)
    expect(detail.body.data.permissions).toEqual({ run: false, rename: false })
    expect((await getAs(app, cookie, `/api/v1/analyses/${analysisId}/versions/1/units.csv`)).status).toBe(200)
    for (const res of [
      await createAnalysis(cookie, { datasetId: dataset.id }),
      await postAs(app, cookie, `/api/v1/analyses/${analysisId}/versions`, {
        settings: { bootstrap: { seed: 'other' } },
      }),
      await patchAs(app, cookie, `/api/v1/analyses/${analysisId}`, { name: 'reviewed' }),
    ]) {
      expect(res.status).toBe(403)
      expect(res.body.error.code).toBe('FORBIDDEN')
    }
  })

  it('answers 401 without a session and refuses writes without the client header', async () => {
    expect((await request(app).get(`/api/v1/analyses/${analysisId}`)).status).toBe(401)
    const bare = await request(app)
      .post('/api/v1/analyses')
      .set('Cookie', team.cookies.scientist)
      .send({ datasetId: dataset.id })
    expect(bare.status).toBe(403)
  })

  it('answers 404 for versions and analyses that do not exist', async () => {
    expect((await getAs(app, team.cookies.pi, `/api/v1/analyses/${analysisId}/versions/99`)).status).toBe(404)
    expect((await getAs(app, team.cookies.pi, '/api/v1/analyses/999999999')).status).toBe(404)
  })
})

describe('dataset versions and deleted datasets', () => {
  it('runs a new analysis version on a newer dataset version, recording its checksum', async () => {
    const data = await taggedDataset(
      app,
      team.cookies.scientist,
      team.lab.id,
      neuriteCsv({ seed: 'v1' }),
      ['mouse'],
      'two-versions',
    )
    const created = await createAnalysis(team.cookies.scientist, { datasetId: data.id })
    const id = created.body.data.id
    await pollUntilFinished(app, team.cookies.scientist, id, 1)
    const upload = await uploadVersion(
      app,
      team.cookies.scientist,
      data.id,
      Buffer.from(neuriteCsv({ seed: 'v2', mice: 12 })),
      'two-versions.csv',
    )
    expect(upload.status, JSON.stringify(upload.body)).toBe(201)
    const v2sha = upload.body.data.sha256 as string
    expect(upload.body.data.tagging).toMatchObject({ carriedOver: true })
    const res = await postAs(app, team.cookies.scientist, `/api/v1/analyses/${id}/versions`, {
      datasetVersionNo: 2,
    })
    expect(res.status, JSON.stringify(res.body)).toBe(201)
    expect(res.body.data.datasetVersion).toMatchObject({ versionNo: 2, sha256: v2sha })
    await pollUntilFinished(app, team.cookies.scientist, id, 2)
    const [first, second] = await Promise.all(
      [1, 2].map(
        async (v) =>
          (await getAs(app, team.cookies.scientist, `/api/v1/analyses/${id}/versions/${v}`)).body
            .data as AnalysisVersionDetail,
      ),
    )
    expect(first.result!.levels[0].nUnits).toBe(10)
    expect(second.result!.levels[0].nUnits).toBe(12)
    expect(first.datasetVersion.sha256).not.toBe(v2sha)
  })

  it('hides the analyses of a deleted dataset', async () => {
    const data = await taggedDataset(
      app,
      team.cookies.scientist,
      team.lab.id,
      neuriteCsv({ seed: 'deleted' }),
      ['mouse'],
      'to-delete',
    )
    const id = (await createAnalysis(team.cookies.scientist, { datasetId: data.id })).body.data.id
    await pollUntilFinished(app, team.cookies.scientist, id, 1)
    expect((await deleteAs(app, team.cookies.scientist, `/api/v1/datasets/${data.id}`)).status).toBe(204)
    expect((await getAs(app, team.cookies.scientist, `/api/v1/analyses/${id}`)).status).toBe(404)
    const list = (await getAs(app, team.cookies.scientist, '/api/v1/analyses')).body.data
    expect(list.map((a: { id: number }) => a.id)).not.toContain(id)
  })
})

describe('data too thin for the model', () => {
  it('fails the version with the engine’s own words, and the CSV export answers 422 with them', async () => {
    // One lab only, but "lab" asked for as the outermost level: the model needs at least two labs.
    const res = await createAnalysis(team.cookies.scientist, {
      datasetId: dataset.id,
      settings: { levels: ['lab', 'mouse'] },
    })
    expect(res.status, JSON.stringify(res.body)).toBe(201)
    const { final } = await pollUntilFinished(app, team.cookies.scientist, res.body.data.id, 1)
    expect(final.status).toBe('failed')
    expect(final.error).toMatchObject({
      code: 'UNPROCESSABLE',
      message: expect.stringContaining('"lab" has only 1 unit'),
    })
    const csv = await getAs(
      app,
      team.cookies.scientist,
      `/api/v1/analyses/${res.body.data.id}/versions/1/units.csv`,
    )
    expect(csv.status).toBe(422)
    expect(csv.body.error).toMatchObject({ code: 'UNPROCESSABLE', message: final.error.message })
  })
})

describe('unit table export', () => {
  it('neutralises labels a spreadsheet would run as formulas, quotes per RFC 4180, and names the file after the analysis', async () => {
    const labels = ['=1+2', '+SUM(A1)', '-3', '@cmd', 'plain, "quoted"', 'm06']
    const csv = neuriteCsv({ seed: 'formulas', mice: 6, mouseLabel: (m) => labels[m - 1] })
    const data = await taggedDataset(
      app,
      team.cookies.scientist,
      team.lab.id,
      csv,
      ['mouse'],
      'formula-labels',
    )
    const created = await createAnalysis(team.cookies.scientist, {
      datasetId: data.id,
      name: 'Ünits: "risky" / labels',
    })
    expect(created.status, JSON.stringify(created.body)).toBe(201)
    const id = created.body.data.id
    const { final } = await pollUntilFinished(app, team.cookies.scientist, id, 1)
    expect(final.status, JSON.stringify(final)).toBe('done')

    const res = await getAs(app, team.cookies.scientist, `/api/v1/analyses/${id}/versions/1/units.csv`)
    expect(res.status).toBe(200)
    expect(res.headers['content-type']).toBe('text/csv; charset=utf-8')
    expect(res.headers['content-disposition']).toBe('attachment; filename=Units-risky-labels-v1-units.csv')
    const text = res.text.replace(/^\uFEFF/, '')
    const rows = Papa.parse<string[]>(text.trimEnd(), { newline: '\r\n' }).data
    expect(rows[0]).toEqual(['level', 'unit', 'condition', 'n', 'mean', 'sd'])
    const units = rows.slice(1).map((r) => r[1])
    expect(units.sort()).toEqual(["'+SUM(A1)", "'-3", "'=1+2", "'@cmd", 'm06', 'plain, "quoted"'].sort())
    expect(text).toContain('"plain, ""quoted"""')
    const version = (await getAs(app, team.cookies.scientist, `/api/v1/analyses/${id}/versions/1`)).body
      .data as AnalysisVersionDetail
    for (const row of rows.slice(1)) {
      const unit = version.chart!.unitLevels[0].units.find((u) => u.label === row[1].replace(/^'/, ''))!
      expect(row).toEqual([
        'mouse',
        row[1],
        unit.condition,
        String(unit.n),
        String(unit.mean),
        String(unit.sd),
      ])
    }
  })
})
