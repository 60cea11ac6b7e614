import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { AnalysisDefaults, AnalysisDetail, type AnalysisSettings } from '../../shared/schemas/analyses'
import { analyzeNested } from '../../shared/analysis/analyze-nested'
import { EngineInputError } from '../../shared/stats/engine-input-error'
import { ENGINE_VERSION } from '../../shared/stats/engine-version'
import { db } from '../../server/db'
import { startAnalysisRunner, stopAnalysisRunner } from '../../server/jobs/analysis-runner'
import { insertAnalysis, insertAnalysisVersion } from '../../server/repositories/analyses.repo'
import { loadNestedColumns } from '../../server/rows-store/read-back'
import { closeConnections, createTestApp } from '../support/api'
import { pollUntilFinished, taggedDataset, twoFactorCsv } from './analyses-support'
import { getAs, postAs, signedInTeam } from './datasets-support'

/**
 * Settings with two condition factors and covariates: stored as sent, checked against the kept
 * rows (a covariate with text, a constant or confounded second factor), and a design the engine
 * refuses at run time ending as an UNPROCESSABLE failure in the engine's words.
 */
const app = createTestApp()

let team: Awaited<ReturnType<typeof signedInTeam>>
let dataset: Awaited<ReturnType<typeof taggedDataset>>
let withText: Awaited<ReturnType<typeof taggedDataset>>

const LEVELS = ['lab', 'mouse', 'coverslip']
/** Engine 0.1 fits one factor and no covariate; 0.2 fits two factors and covariates. */

beforeAll(async () => {
  startAnalysisRunner({ pollMs: 100, reapEveryMs: 500 })
  team = await signedInTeam(app)
  dataset = await taggedDataset(
    app,
    team.cookies.scientist,
    team.lab.id,
    twoFactorCsv(),
    LEVELS,
    'two-factors',
  )
  // Data row 7 holds "n.d." as its soma area: file row 8, below the header.
  withText = await taggedDataset(
    app,
    team.cookies.scientist,
    team.lab.id,
    twoFactorCsv({ textSomaAtRow: 7 }),
    LEVELS,
    'soma-text',
  )
}, 120_000)

afterAll(async () => {
  await stopAnalysisRunner()
  await closeConnections()
})

const create = (datasetId: number, settings: object) =>
  postAs(app, team.cookies.scientist, '/api/v1/analyses', { datasetId, settings })

describe('two condition factors and a covariate', () => {
  it('creates the analysis (201) with the settings stored exactly as sent', async () => {
    const sent = {
      conditions: ['genotype', 'treatment'],
      covariates: ['soma_area_um2'],
      reference: { genotype: 'WT', treatment: 'vehicle' },
    }
    const res = await create(dataset.id, sent)
    expect(res.status, JSON.stringify(res.body)).toBe(201)
    const detail = AnalysisDetail.parse(res.body.data)
    const expected: AnalysisSettings = {
      response: 'neurite_length_um',
      levels: LEVELS,
      bootstrap: { enabled: false, resamples: 2000, seed: '1' },
      family: 'gaussian',
      trials: null,
      positive: null,
      ...sent,
    }
    expect(detail.versions[0].settings).toEqual(expected)
    const stored = await db('analysis_versions').where({ analysis_id: detail.id }).first('settings')
    expect(stored.settings).toEqual(expected)

    const { final } = await pollUntilFinished(app, team.cookies.scientist, detail.id, 1)
    expect(final.status, JSON.stringify(final)).toBe('done')
    const version = (await getAs(app, team.cookies.scientist, `/api/v1/analyses/${detail.id}/versions/1`))
      .body.data
    expect(version.result.factors.map((f: { name: string }) => f.name)).toEqual(['genotype', 'treatment'])
    expect(version.result.covariates.map((c: { name: string }) => c.name)).toEqual(['soma_area_um2'])
    expect(version.result.reference).toBe('WT:vehicle')
  })

  it('offers the labels of every text column for the reference of each factor', async () => {
    const res = await getAs(app, team.cookies.scientist, `/api/v1/analyses/defaults?datasetId=${dataset.id}`)
    const defaults = AnalysisDefaults.parse(res.body.data)
    expect(defaults.labelsByColumn.genotype.sort()).toEqual(['KO-3', 'WT'])
    expect(defaults.labelsByColumn.treatment.sort()).toEqual(['NW-117', 'vehicle'])
    expect(defaults.numericColumns).toContain('soma_area_um2')
  })

  it('ignores an error bar sent with the settings: it is no longer a setting', async () => {
    const res = await create(dataset.id, { conditions: ['treatment'], errorBar: 'sd' })
    expect(res.status, JSON.stringify(res.body)).toBe(201)
    expect(res.body.data.versions[0].settings).not.toHaveProperty('errorBar')
    const stored = await db('analysis_versions').where({ analysis_id: res.body.data.id }).first('settings')
    expect(stored.settings).not.toHaveProperty('errorBar')
  })
})

describe('a covariate holding text', () => {
  it('answers 400 naming the column and the first kept file row with text, for a new analysis and a new version', async () => {
    const plain = await create(withText.id, {})
    expect(plain.status, JSON.stringify(plain.body)).toBe(201)
    for (const res of [
      await create(withText.id, { covariates: ['soma_area_um2'] }),
      await postAs(app, team.cookies.scientist, `/api/v1/analyses/${plain.body.data.id}/versions`, {
        settings: { covariates: ['soma_area_um2'] },
      }),
    ]) {
      expect(res.status, JSON.stringify(res.body)).toBe(400)
      expect(res.body.error).toMatchObject({
        code: 'INVALID_PAYLOAD',
        message:
          '“soma_area_um2” cannot be a covariate: row 8 holds “n.d.”, which is not a number. Correct the file, or exclude such rows first.',
        details: { column: 'soma_area_um2', row: 8 },
      })
      expect(res.body.error.details.issues[0].path).toBe('settings.covariates.0')
    }
  })

  it('accepts the covariate once that row is excluded', async () => {
    const rule = await postAs(
      app,
      team.cookies.scientist,
      `/api/v1/datasets/${withText.id}/versions/1/exclusions`,
      {
        kind: 'rule',
        rule: { column: 'soma_area_um2', operator: 'eq', value: 'n.d.' },
        reason: 'soma not measured',
      },
    )
    expect(rule.status, JSON.stringify(rule.body)).toBe(201)
    const res = await create(withText.id, { covariates: ['soma_area_um2'] })
    expect(res.status, JSON.stringify(res.body)).toBe(201)
  })
})

describe('a second factor that cannot be told apart', () => {
  it('answers 422 naming a constant second factor', async () => {
    const res = await create(dataset.id, { conditions: ['genotype', 'batch'] })
    expect(res.status, JSON.stringify(res.body)).toBe(422)
    expect(res.body.error).toMatchObject({
      code: 'UNPROCESSABLE',
      message: expect.stringContaining('The condition “batch” has a single value (“B1”) in the rows kept'),
      details: { column: 'batch' },
    })
  })

  it('answers 422 naming both columns when the second factor is the first under other names', async () => {
    const first = await create(dataset.id, { conditions: ['genotype'] })
    expect(first.status).toBe(201)
    for (const res of [
      await create(dataset.id, { conditions: ['genotype', 'line'] }),
      await postAs(app, team.cookies.scientist, `/api/v1/analyses/${first.body.data.id}/versions`, {
        settings: { conditions: ['genotype', 'line'] },
      }),
    ]) {
      expect(res.status, JSON.stringify(res.body)).toBe(422)
      expect(res.body.error.message).toContain(
        'The conditions “genotype” and “line” are fully confounded in the rows kept',
      )
      expect(res.body.error.details).toEqual({ columns: ['genotype', 'line'] })
    }
  })

  it('answers 422 naming the second factor and the level when it just renames that level’s units', async () => {
    const tagged = await taggedDataset(
      app,
      team.cookies.scientist,
      team.lab.id,
      twoFactorCsv({ earTags: true }),
      LEVELS,
      'ear-tags',
    )
    const before = await db('analyses').where({ dataset_id: tagged.id }).count<{ n: string }[]>('* as n')
    for (const conditions of [
      ['genotype', 'ear_tag'],
      ['ear_tag', 'treatment'],
    ]) {
      const res = await create(tagged.id, { conditions })
      expect(res.status, JSON.stringify(res.body)).toBe(422)
      expect(res.body.error.message).toBe(
        'The condition “ear_tag” groups the kept rows exactly as the level “mouse” does (each mouse has a value of “ear_tag” of its own), so its effect cannot be told apart from mouse-to-mouse differences. Leave it out of the conditions, or choose the nesting levels again.',
      )
      expect(res.body.error.details).toEqual({ column: 'ear_tag', columns: ['ear_tag', 'mouse'] })
    }
    const after = await db('analyses').where({ dataset_id: tagged.id }).count<{ n: string }[]>('* as n')
    expect(after).toEqual(before)
    // Conditions several mice share are factors of the comparison.
    expect((await create(tagged.id, { conditions: ['genotype', 'treatment'] })).status).toBe(201)
  })

  it('ends a run the engine refuses as UNPROCESSABLE, in the engine’s own words', async () => {
    // Written straight to the tables, as a version stored before these checks existed would be.
    const { project_id: projectId } = await db('datasets').where({ id: dataset.id }).first('project_id')
    const settings: AnalysisSettings = {
      response: 'neurite_length_um',
      conditions: ['genotype', 'line'],
      covariates: [],
      levels: LEVELS,
      reference: {},
      bootstrap: { enabled: false, resamples: 2000, seed: '1' },
      family: 'gaussian',
      trials: null,
      positive: null,
    }
    const analysisId = await insertAnalysis({
      labId: team.lab.id,
      projectId,
      datasetId: dataset.id,
      name: 'confounded, stored earlier',
      createdBy: team.scientist.id,
    })
    await insertAnalysisVersion({
      analysisId,
      versionNo: 1,
      datasetVersionId: dataset.latestVersion.id,
      datasetSha256: dataset.latestVersion.sha256,
      settings,
      exclusions: [],
      engineVersion: ENGINE_VERSION,
      createdBy: team.scientist.id,
    })
    const columns = await loadNestedColumns(dataset.latestVersion.id, settings, [])
    let refusal: unknown = null
    try {
      analyzeNested(columns, { reference: settings.reference })
    } catch (error) {
      refusal = error
    }
    expect(refusal).toBeInstanceOf(EngineInputError)

    const { final } = await pollUntilFinished(app, team.cookies.scientist, analysisId, 1)
    expect(final.status).toBe('failed')
    expect(final.error).toMatchObject({ code: 'UNPROCESSABLE', message: (refusal as Error).message })
    const csv = await getAs(
      app,
      team.cookies.scientist,
      `/api/v1/analyses/${analysisId}/versions/1/units.csv`,
    )
    expect(csv.status).toBe(422)
  })
})
