import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import {
  inventedNeuronCsv,
  inventedNeuronRows,
  type InventedRow,
} from '../../shared/analysis/fixtures/invented-glmm-tables'
import {
  AnalysisDefaults,
  AnalysisDetail,
  AnalysisSettings,
  AnalysisVersionDetail,
} from '../../shared/schemas/analyses'
import { PlanDefaults, PlanResult } from '../../shared/schemas/plans'
import { db } from '../../server/db'
import { closeConnections, createTestApp } from '../support/api'
import { finishQueuedVersion } from '../support/finished-version'
import { getAs, postAs, putAs, signedInTeam, uploadDataset } from './datasets-support'

/**
 * Binary and count responses through the API: the defaults say which columns could be yes/no or
 * counts; settings with a family are stored with the value counted as yes decided and named;
 * values a family cannot take are 400s naming the file row; a finished run carries the family,
 * the yes value, proportions per unit and the unit table of proportions. Tables are invented
 * (neurons in mice in three fictional labs, see invented-glmm-tables.ts).
 */
const app = createTestApp()

let team: Awaited<ReturnType<typeof signedInTeam>>
const LEVELS = ['lab', 'mouse']

async function upload(csv: string, name: string, tagging?: object) {
  const res = await uploadDataset(app, team.cookies.scientist, Buffer.from(csv), `${name}.csv`, {
    labId: team.lab.id,
    name,
  })
  expect(res.status, JSON.stringify(res.body)).toBe(201)
  const dataset = res.body.data as { id: number; latestVersion: { id: number } }
  if (tagging) {
    const tag = await putAs(
      app,
      team.cookies.scientist,
      `/api/v1/datasets/${dataset.id}/versions/1/tagging`,
      tagging,
    )
    expect(tag.status, JSON.stringify(tag.body)).toBe(200)
  }
  return dataset
}

const create = (datasetId: number, settings: object) =>
  postAs(app, team.cookies.scientist, '/api/v1/analyses', { datasetId, settings })

/** The invented neuron rows with some cells replaced, as a careless export might hold them. */
function csvWith(change: (row: InventedRow, index: number) => InventedRow): string {
  return inventedNeuronCsv(inventedNeuronRows().map(change))
}

/** Successes out of trials per mouse: positive neurons out of neurons counted. */
function aggregatedCsv(change?: (line: string[], index: number) => string[]): string {
  const byMouse = new Map<string, { lab: string; mouse: string; treatment: string; yes: number; n: number }>()
  for (const r of inventedNeuronRows()) {
    const key = `${r.lab}/${r.mouse}`
    const entry = byMouse.get(key) ?? { lab: r.lab, mouse: r.mouse, treatment: r.treatment, yes: 0, n: 0 }
    entry.yes += r.marker === 'positive' ? 1 : 0
    entry.n += 1
    byMouse.set(key, entry)
  }
  const lines = [...byMouse.values()].map((m, i) => {
    const line = [m.lab, m.mouse, m.treatment, String(m.yes), String(m.n)]
    return (change ? change(line, i) : line).join(',')
  })
  return ['lab,mouse,treatment,positive_neurons,neurons_counted', ...lines].join('\n') + '\n'
}

let neurons: Awaited<ReturnType<typeof upload>>

beforeAll(async () => {
  team = await signedInTeam(app)
  neurons = await upload(inventedNeuronCsv(), 'marker-neurons', {
    responseColumns: ['puncta'],
    conditionColumn: 'treatment',
    levels: LEVELS,
  })
}, 120_000)

afterAll(closeConnections)

describe('the columns a binary or count response can come from', () => {
  it('lists two-valued columns with their values and whole-number columns as counts', async () => {
    const res = await getAs(app, team.cookies.scientist, `/api/v1/analyses/defaults?datasetId=${neurons.id}`)
    expect(res.status, JSON.stringify(res.body)).toBe(200)
    const defaults = AnalysisDefaults.parse(res.body.data)
    // Any two-valued text column could be a yes/no response; the person picks the response.
    expect(Object.keys(defaults.binaryColumns).sort()).toEqual(['marker', 'treatment'])
    expect([...defaults.binaryColumns.marker].sort()).toEqual(['negative', 'positive'])
    expect(defaults.countColumns).toEqual(['puncta'])
    // The tagging's settings start as a normal response.
    expect(defaults.settings).toMatchObject({
      response: 'puncta',
      family: 'gaussian',
      trials: null,
      positive: null,
    })
  })
})

describe('a yes/no response', () => {
  it('stores the value counted as yes when none was named, and the run says so', async () => {
    const res = await create(neurons.id, { response: 'marker', family: 'binomial' })
    expect(res.status, JSON.stringify(res.body)).toBe(201)
    const detail = AnalysisDetail.parse(res.body.data)
    expect(detail.versions[0].settings).toMatchObject({
      response: 'marker',
      family: 'binomial',
      trials: null,
      positive: 'positive',
    })
    const stored = await db('analysis_versions').where({ analysis_id: detail.id }).first('settings')
    expect(stored.settings).toMatchObject({ family: 'binomial', positive: 'positive' })

    await finishQueuedVersion(detail.id)
    const version = AnalysisVersionDetail.parse(
      (await getAs(app, team.cookies.scientist, `/api/v1/analyses/${detail.id}/versions/1`)).body.data,
    )
    const result = version.result!
    expect(result.family).toBe('binomial')
    expect(result.outcome).toEqual({ positive: 'positive', negative: 'negative' })
    expect(result.model?.formula).toBe('marker ~ treatment + (1|lab) + (1|lab:treatment) + (1|lab:mouse)')
    // Plain proportion of the vehicle arm, counted from the invented rows.
    const rows = inventedNeuronRows().filter((r) => r.treatment === 'vehicle')
    const vehicle = result.groups.find((g) => g.condition === 'vehicle')!
    expect(vehicle.mean).toBeCloseTo(rows.filter((r) => r.marker === 'positive').length / rows.length, 12)
    expect(version.chart?.family).toBe('binomial')
    const mice = version.chart!.unitLevels.find((l) => l.level === 'mouse')!.units
    expect(mice).toHaveLength(24)
    expect(mice.every((u) => u.mean >= 0 && u.mean <= 1)).toBe(true)

    const csv = await getAs(app, team.cookies.scientist, `/api/v1/analyses/${detail.id}/versions/1/units.csv`)
    expect(csv.status).toBe(200)
    expect(csv.text.replace(/^\uFEFF/, '').split('\r\n')[0]).toBe(
      'level,unit,condition,n,successes,trials,proportion',
    )
  })

  it('honours the value a person names as yes', async () => {
    const res = await create(neurons.id, { response: 'marker', family: 'binomial', positive: 'negative' })
    expect(res.status, JSON.stringify(res.body)).toBe(201)
    const detail = AnalysisDetail.parse(res.body.data)
    expect(detail.versions[0].settings.positive).toBe('negative')
    await finishQueuedVersion(detail.id)
    const result = AnalysisVersionDetail.parse(
      (await getAs(app, team.cookies.scientist, `/api/v1/analyses/${detail.id}/versions/1`)).body.data,
    ).result!
    expect(result.outcome).toEqual({ positive: 'negative', negative: 'positive' })
  })

  it('answers 400 for a yes value the column does not hold', async () => {
    const res = await create(neurons.id, { response: 'marker', family: 'binomial', positive: 'yes' })
    expect(res.status).toBe(400)
    // The two values in the order the file first uses them.
    const first = inventedNeuronRows()[0].marker
    const other = first === 'positive' ? 'negative' : 'positive'
    expect(res.body.error.message).toBe(
      `“yes” is not a value of “marker” (it has “${first}” and “${other}”).`,
    )
    expect(res.body.error.details.issues).toEqual([
      { path: 'settings.positive', message: res.body.error.message },
    ])
  })

  it('answers 400 naming the first row with a third value, and stores nothing', async () => {
    // Data row 40 (file row 41) holds "unsure".
    const dataset = await upload(
      csvWith((r, i) => (i === 39 ? { ...r, marker: 'unsure' } : r)),
      'marker-unsure',
    )
    const before = await db('analyses').count<{ count: string }[]>('* as count')
    const res = await create(dataset.id, { response: 'marker', family: 'binomial', levels: LEVELS })
    expect(res.status).toBe(400)
    expect(res.body.error.message).toMatch(
      /^“marker” cannot be a yes\/no response: row 41 holds “unsure”, a third value besides “(positive|negative)” and “(positive|negative)”\./,
    )
    expect(res.body.error.details).toMatchObject({ column: 'marker', row: 41 })
    expect(await db('analyses').count<{ count: string }[]>('* as count')).toEqual(before)
  })

  it('leaves out rows excluded before the check', async () => {
    const dataset = await upload(
      csvWith((r, i) => (i === 39 ? { ...r, marker: 'unsure' } : r)),
      'marker-unsure-excluded',
    )
    const exclusion = await postAs(
      app,
      team.cookies.scientist,
      `/api/v1/datasets/${dataset.id}/versions/1/exclusions`,
      {
        kind: 'rule',
        reason: 'not scored',
        rule: { column: 'marker', operator: 'eq', value: 'unsure' },
      },
    )
    expect(exclusion.status, JSON.stringify(exclusion.body)).toBe(201)
    const res = await create(dataset.id, { response: 'marker', family: 'binomial', levels: LEVELS })
    expect(res.status, JSON.stringify(res.body)).toBe(201)
  })

  it('reads a 0/1 column with 1 as yes', async () => {
    const dataset = await upload(
      inventedNeuronCsv().replaceAll(',positive,', ',1,').replaceAll(',negative,', ',0,'),
      'marker-01',
    )
    const res = await create(dataset.id, { response: 'marker', family: 'binomial', levels: LEVELS })
    expect(res.status, JSON.stringify(res.body)).toBe(201)
    expect(AnalysisDetail.parse(res.body.data).versions[0].settings.positive).toBe('1')
  })
})

describe('a count response', () => {
  it('runs as a Poisson model and gives the unit table of rates', async () => {
    const res = await create(neurons.id, { family: 'poisson', levels: ['lab', 'mouse', 'neuron'] })
    expect(res.status, JSON.stringify(res.body)).toBe(201)
    const detail = AnalysisDetail.parse(res.body.data)
    expect(detail.versions[0].settings).toMatchObject({
      response: 'puncta',
      family: 'poisson',
      positive: null,
    })
    await finishQueuedVersion(detail.id)
    const version = AnalysisVersionDetail.parse(
      (await getAs(app, team.cookies.scientist, `/api/v1/analyses/${detail.id}/versions/1`)).body.data,
    )
    expect(version.result).toMatchObject({ family: 'poisson', model: { family: 'poisson(link = "log")' } })
    expect(version.result!.outcome).toBeUndefined()
    const csv = await getAs(app, team.cookies.scientist, `/api/v1/analyses/${detail.id}/versions/1/units.csv`)
    expect(csv.text.replace(/^\uFEFF/, '').split('\r\n')[0]).toBe('level,unit,condition,n,count,rate,sd')
  })

  it.each([
    ['-1', 'negative'],
    ['2.5', 'fractional'],
  ])('answers 400 naming the first row holding %s (%s)', async (value) => {
    const dataset = await upload(
      csvWith((r, i) => (i === 11 ? { ...r, puncta: Number(value) } : r)),
      `puncta-${value}`,
    )
    const res = await create(dataset.id, { response: 'puncta', family: 'poisson', levels: LEVELS })
    expect(res.status).toBe(400)
    expect(res.body.error.message).toBe(
      `“puncta” cannot be a count response: row 13 holds “${value}”, which is not a whole number of at least 0. Correct the file, or exclude such rows first.`,
    )
    expect(res.body.error.details).toMatchObject({
      column: 'puncta',
      row: 13,
      issues: [{ path: 'settings.response' }],
    })
  })
})

describe('successes out of trials', () => {
  const settings = {
    response: 'positive_neurons',
    family: 'binomial',
    trials: 'neurons_counted',
    levels: LEVELS,
    conditions: ['treatment'],
  }

  it('fits the same odds ratio as the per-neuron yes/no table', async () => {
    const aggregated = await upload(aggregatedCsv(), 'marker-aggregated')
    const res = await create(aggregated.id, settings)
    expect(res.status, JSON.stringify(res.body)).toBe(201)
    const detail = AnalysisDetail.parse(res.body.data)
    expect(detail.versions[0].settings).toMatchObject({ trials: 'neurons_counted', positive: null })
    await finishQueuedVersion(detail.id)
    const aggregatedResult = AnalysisVersionDetail.parse(
      (await getAs(app, team.cookies.scientist, `/api/v1/analyses/${detail.id}/versions/1`)).body.data,
    ).result!
    expect(aggregatedResult.model?.formula).toBe(
      'cbind(positive_neurons, neurons_counted - positive_neurons) ~ treatment + (1|lab) + (1|lab:treatment) + (1|lab:mouse)',
    )

    const perNeuron = await create(neurons.id, {
      response: 'marker',
      family: 'binomial',
      conditions: ['treatment'],
    })
    await finishQueuedVersion(perNeuron.body.data.id)
    const perNeuronResult = AnalysisVersionDetail.parse(
      (await getAs(app, team.cookies.scientist, `/api/v1/analyses/${perNeuron.body.data.id}/versions/1`)).body
        .data,
    ).result!
    // The likelihood depends on (successes, trials) per mouse only (issue 13's property).
    const ratio = (r: typeof perNeuronResult) => {
      const c = r.comparisons.mixedModel!.contrasts[0]
      return 'ratio' in c ? c.ratio : NaN
    }
    expect(ratio(aggregatedResult)).toBeCloseTo(ratio(perNeuronResult), 4)
  })

  it('answers 400 naming the row where the successes exceed the trials', async () => {
    const dataset = await upload(
      aggregatedCsv((line, i) => (i === 4 ? [...line.slice(0, 3), '40', line[4]] : line)),
      'marker-too-many',
    )
    const res = await create(dataset.id, settings)
    expect(res.status).toBe(400)
    expect(res.body.error.message).toMatch(
      /^Row 6 has 40 successes in “positive_neurons” but only \d+ trials in “neurons_counted”: successes cannot exceed the trials\.$/,
    )
    expect(res.body.error.details).toMatchObject({ column: 'positive_neurons', row: 6 })
  })

  it('answers 400 for trials that are not whole numbers of at least 1', async () => {
    const dataset = await upload(
      aggregatedCsv((line, i) => (i === 2 ? [...line.slice(0, 3), '0', '0'] : line)),
      'marker-no-trials',
    )
    const res = await create(dataset.id, settings)
    expect(res.status).toBe(400)
    expect(res.body.error.message).toBe(
      'Row 4 of “neurons_counted” holds “0”: trials must be whole numbers of at least 1. Correct the file, or exclude such rows first.',
    )
    expect(res.body.error.details.issues).toEqual([
      { path: 'settings.trials', message: res.body.error.message },
    ])
  })

  it('answers 400 for a trials column that is not there, or a bootstrap with trials', async () => {
    const dataset = await upload(aggregatedCsv(), 'marker-aggregated-2')
    const missing = await create(dataset.id, { ...settings, trials: 'cells' })
    expect(missing.status).toBe(400)
    expect(missing.body.error.details.issues).toEqual([
      { path: 'settings.trials', message: 'Version 1 of this dataset has no column “cells”.' },
    ])
    const boot = await create(dataset.id, { ...settings, bootstrap: { enabled: true } })
    expect(boot.status).toBe(400)
    expect(boot.body.error.details.issues[0].path).toBe('settings.bootstrap.enabled')
  })
})

describe('settings stored before families', () => {
  it('read as a normal response and stay as stored', async () => {
    const res = await create(neurons.id, {})
    expect(res.status, JSON.stringify(res.body)).toBe(201)
    const id = res.body.data.id as number
    // As engine 0.2 wrote them: no family, no trials, no value counted as yes.
    const older = { ...AnalysisSettings.parse(res.body.data.versions[0].settings) } as Record<string, unknown>
    delete older.family
    delete older.trials
    delete older.positive
    await db('analysis_versions')
      .where({ analysis_id: id, version_no: 1 })
      .update({ settings: JSON.stringify(older) })
    const read = AnalysisDetail.parse(
      (await getAs(app, team.cookies.scientist, `/api/v1/analyses/${id}`)).body.data,
    )
    expect(read.versions[0].settings).toMatchObject({ family: 'gaussian', trials: null, positive: null })
    expect((await db('analysis_versions').where({ analysis_id: id }).first('settings')).settings).toEqual(
      older,
    )
    // Asking for the same again is "nothing changed", not a new version.
    await finishQueuedVersion(id)
    const again = await postAs(app, team.cookies.scientist, `/api/v1/analyses/${id}/versions`, {
      settings: {},
    })
    expect(again.status).toBe(409)
  })
})

describe('planning from a yes/no analysis', () => {
  it('suggests a plan on the proportion scale, previews it and saves it', async () => {
    const res = await create(neurons.id, {
      response: 'marker',
      family: 'binomial',
      conditions: ['treatment'],
    })
    expect(res.status, JSON.stringify(res.body)).toBe(201)
    const analysisId = res.body.data.id as number
    await finishQueuedVersion(analysisId)
    const defaults = PlanDefaults.parse(
      (
        await getAs(
          app,
          team.cookies.scientist,
          `/api/v1/plans/defaults?analysisId=${analysisId}&versionNo=1`,
        )
      ).body.data,
    )
    expect(defaults.inputs.measure).toMatchObject({ kind: 'proportion' })
    // The difference is the person's to give (the plain one observed is only a reference).
    expect(defaults.inputs.difference).toBeNull()
    expect(defaults.observed).toMatchObject({ what: expect.stringMatching(/plain proportions/), ci: null })
    const inputs = { ...defaults.inputs, difference: 0.15 }
    const preview = await postAs(app, team.cookies.scientist, '/api/v1/plans/preview', { inputs })
    expect(preview.status, JSON.stringify(preview.body)).toBe(200)
    const result = PlanResult.parse(preview.body.data)
    const { measure } = defaults.inputs
    if (measure.kind !== 'proportion') throw new Error('expected a plan of proportions')
    expect(result.measure).toMatchObject({ kind: 'proportion', control: measure.control })
    expect(result.notes[0]).toMatch(/^Planned for a proportion of /)

    const saved = await postAs(app, team.cookies.scientist, '/api/v1/plans', {
      labId: team.lab.id,
      name: 'Marker plan',
      source: { analysisId, versionNo: 1 },
      inputs,
    })
    expect(saved.status, JSON.stringify(saved.body)).toBe(201)
    expect(saved.body.data.inputs.measure.kind).toBe('proportion')
  })

  it('answers 400 for a target proportion of 1 or more', async () => {
    const preview = await postAs(app, team.cookies.scientist, '/api/v1/plans/preview', {
      inputs: {
        icc: 0.05,
        spread: { kind: 'total', sdTotal: 0.5 },
        difference: 0.5,
        costPerUnit: 100,
        costPerObs: 1,
        measure: { kind: 'proportion', control: 0.6, latentIcc: 0.1 },
      },
    })
    expect(preview.status).toBe(400)
    expect(JSON.stringify(preview.body.error)).toContain(
      'The control proportion plus the difference must stay below 1',
    )
  })
})
