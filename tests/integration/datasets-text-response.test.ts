import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { inventedNeuronRows, type InventedRow } from '../../shared/analysis/fixtures/invented-glmm-tables'
import { AnalysisDefaults, AnalysisDetail, AnalysisVersionDetail } from '../../shared/schemas/analyses'
import { db } from '../../server/db'
import { closeConnections, createTestApp } from '../support/api'
import { finishQueuedVersion } from '../support/finished-version'
import { getAs, postAs, putAs, signedInTeam, uploadDataset, uploadVersion } from './datasets-support'

/**
 * A table whose only response is a two-valued text column (the invented neuron table without its
 * count column): tagging accepts it, the analysis defaults read it as yes/no, and the run fits the
 * same model as the table with the marker written as 0/1. A text response with three values, or a
 * single one, is refused naming the column and a row, and no tagging is stored.
 */
const app = createTestApp()
let team: Awaited<ReturnType<typeof signedInTeam>>

const TAGGING = { responseColumns: ['marker'], conditionColumn: 'treatment', levels: ['lab', 'mouse'] }

/** The yes/no table with only text columns; `marker` as the rows give it (or changed). */
function yesNoCsv(marker: (row: InventedRow, index: number) => string = (r) => r.marker): string {
  const lines = inventedNeuronRows().map((r, i) =>
    [r.lab, r.mouse, r.treatment, r.neuron, marker(r, i)].join(','),
  )
  return ['lab,mouse,treatment,neuron,marker', ...lines].join('\n') + '\n'
}

async function upload(csv: string, name: string): Promise<number> {
  const res = await uploadDataset(app, team.cookies.scientist, Buffer.from(csv), `${name}.csv`, {
    labId: team.lab.id,
    name,
  })
  expect(res.status, JSON.stringify(res.body)).toBe(201)
  return res.body.data.id as number
}

const tag = (datasetId: number, body: object = TAGGING) =>
  putAs(app, team.cookies.scientist, `/api/v1/datasets/${datasetId}/versions/1/tagging`, body)

async function taggingsOf(datasetId: number): Promise<number> {
  const rows = await db('dataset_taggings as t')
    .join('dataset_versions as v', 'v.id', 't.version_id')
    .where('v.dataset_id', datasetId)
    .count<{ count: string }[]>('* as count')
  return Number(rows[0].count)
}

/** Creates an analysis (settings left out come from the tagging), runs it, and returns its result. */
async function analysedResult(datasetId: number, settings: object = {}) {
  const res = await postAs(app, team.cookies.scientist, '/api/v1/analyses', { datasetId, settings })
  expect(res.status, JSON.stringify(res.body)).toBe(201)
  const detail = AnalysisDetail.parse(res.body.data)
  await finishQueuedVersion(detail.id)
  const version = await getAs(app, team.cookies.scientist, `/api/v1/analyses/${detail.id}/versions/1`)
  return {
    settings: detail.versions[0].settings,
    result: AnalysisVersionDetail.parse(version.body.data).result!,
  }
}

beforeAll(async () => {
  team = await signedInTeam(app)
}, 120_000)

afterAll(closeConnections)

describe('a two-valued text column as the response', () => {
  it('is tagged, defaults to yes/no, and fits what the same rows give as 0/1', async () => {
    const text = await upload(yesNoCsv(), 'marker-text-only')
    const tagged = await tag(text)
    expect(tagged.status, JSON.stringify(tagged.body)).toBe(200)
    expect(tagged.body.data.tagging.responseColumns).toEqual(['marker'])

    const defaults = await getAs(app, team.cookies.scientist, `/api/v1/analyses/defaults?datasetId=${text}`)
    expect(AnalysisDefaults.parse(defaults.body.data).settings).toMatchObject({
      response: 'marker',
      family: 'binomial',
      trials: null,
      positive: 'positive',
    })

    const fromText = await analysedResult(text)
    expect(fromText.settings).toMatchObject({
      family: 'binomial',
      positive: 'positive',
      conditions: ['treatment'],
    })
    expect(fromText.result.family).toBe('binomial')
    expect(fromText.result.outcome).toEqual({ positive: 'positive', negative: 'negative' })

    // The same rows with the marker written as 1 (positive) / 0: a numeric column, chosen as binomial.
    const zeroOne = await upload(
      yesNoCsv((r) => (r.marker === 'positive' ? '1' : '0')),
      'marker-zero-one',
    )
    expect((await tag(zeroOne)).status).toBe(200)
    const fromNumbers = await analysedResult(zeroOne, { family: 'binomial' })
    expect(fromNumbers.settings).toMatchObject({ family: 'binomial', positive: '1' })

    const contrast = (r: typeof fromText.result) => {
      const c = r.comparisons.mixedModel!.contrasts[0]
      if (!('ratio' in c)) throw new Error('expected a contrast of a binary model')
      return c
    }
    const a = contrast(fromText.result)
    const b = contrast(fromNumbers.result)
    expect([a.a, a.b]).toEqual([b.a, b.b])
    expect(a.estimate).toBeCloseTo(b.estimate, 9)
    expect(a.se).toBeCloseTo(b.se, 9)
    expect(a.ratio).toBeCloseTo(b.ratio, 9)
  })

  it('is suggested on upload, and its tagging carries over to a new version while it has two values', async () => {
    const id = await upload(yesNoCsv(), 'marker-text-suggested')
    const detail = await getAs(app, team.cookies.scientist, `/api/v1/datasets/${id}/versions/1`)
    expect(detail.body.data.suggestion).toMatchObject({
      responseColumns: ['marker'],
      conditionColumn: 'treatment',
      levels: [{ column: 'lab' }, { column: 'mouse' }],
    })
    expect((await tag(id)).status).toBe(200)

    const v2 = await uploadVersion(app, team.cookies.scientist, id, Buffer.from(yesNoCsv()), 'v2.csv')
    expect(v2.status, JSON.stringify(v2.body)).toBe(201)
    expect(v2.body.data.tagging).toMatchObject({ responseColumns: ['marker'], carriedOver: true })
    const third = yesNoCsv((r, i) => (i === 39 ? 'unsure' : r.marker))
    const v3 = await uploadVersion(app, team.cookies.scientist, id, Buffer.from(third), 'v3.csv')
    expect(v3.status, JSON.stringify(v3.body)).toBe(201)
    expect(v3.body.data.tagging).toBeNull()
  })

  it('leaves rows without a value out, as for a numeric response, and counts them', async () => {
    // Data rows 5 and 9 (file rows 6 and 10) have no marker.
    const id = await upload(
      yesNoCsv((r, i) => (i === 4 || i === 8 ? '' : r.marker)),
      'marker-text-missing',
    )
    const res = await tag(id)
    expect(res.status, JSON.stringify(res.body)).toBe(200)
    expect(res.body.data.design.missingValues).toEqual([{ column: 'marker', rows: 2 }])
  })

  it('is refused with a third value, naming the column, the row and the values; nothing stored', async () => {
    // Data row 40 is file row 41.
    const id = await upload(
      yesNoCsv((r, i) => (i === 39 ? 'unsure' : r.marker)),
      'marker-text-unsure',
    )
    const res = await tag(id)
    expect(res.status).toBe(400)
    expect(res.body.error.message).toMatch(
      /^“marker” cannot be a response: row 41 holds “unsure”, a third value besides “(positive|negative)” and “(positive|negative)”\. As text, a response must hold exactly two values \(yes\/no\)\./,
    )
    expect(res.body.error.details).toMatchObject({ column: 'marker', row: 41 })
    expect(await taggingsOf(id)).toBe(0)
  })

  it('is refused when one of its two values is a number: a measurement with a note, not yes/no', async () => {
    // Data row 1 is file row 2, the first row that is not a number.
    const id = await upload(
      yesNoCsv((_r, i) => (i % 2 ? '5' : 'n.d.')),
      'marker-number-and-note',
    )
    const res = await tag(id)
    expect(res.status).toBe(400)
    expect(res.body.error.message).toBe(
      '“marker” cannot be a response: row 2 holds “n.d.”, which is not a number. Correct the file, or exclude such rows first.',
    )
    expect(await taggingsOf(id)).toBe(0)
  })

  it('is accepted once the third value is excluded, and analysed as yes/no', async () => {
    const id = await upload(
      yesNoCsv((r, i) => (i === 39 ? 'unsure' : r.marker)),
      'marker-text-excluded',
    )
    const exclusion = await postAs(
      app,
      team.cookies.scientist,
      `/api/v1/datasets/${id}/versions/1/exclusions`,
      {
        kind: 'rule',
        reason: 'not scored',
        rule: { column: 'marker', operator: 'eq', value: 'unsure' },
      },
    )
    expect(exclusion.status, JSON.stringify(exclusion.body)).toBe(201)
    expect((await tag(id)).status).toBe(200)

    // The profile (all rows) shows three values; the defaults and the form go by the kept two.
    const defaults = await getAs(app, team.cookies.scientist, `/api/v1/analyses/defaults?datasetId=${id}`)
    const parsed = AnalysisDefaults.parse(defaults.body.data)
    expect([...parsed.binaryColumns.marker].sort()).toEqual(['negative', 'positive'])
    expect(parsed.settings).toMatchObject({ family: 'binomial', positive: 'positive' })
    const { result } = await analysedResult(id)
    expect(result.family).toBe('binomial')
    expect(result.outcome).toEqual({ positive: 'positive', negative: 'negative' })
  })

  it('is refused with a single value in the rows kept', async () => {
    const id = await upload(
      yesNoCsv(() => 'positive'),
      'marker-text-single',
    )
    const res = await tag(id)
    expect(res.status).toBe(400)
    expect(res.body.error.message).toBe(
      '“marker” cannot be a response: it holds a single value (“positive”) in the rows kept. As text, a response must hold exactly two values (yes/no).',
    )
    expect(res.body.error.details).toMatchObject({ column: 'marker' })
    expect(await taggingsOf(id)).toBe(0)
  })
})
