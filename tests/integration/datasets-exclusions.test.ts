import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { loadNestedColumns } from '../../server/rows-store/read-back'
import { closeConnections, createTestApp } from '../support/api'
import {
  deleteAs,
  getAs,
  postAs,
  putAs,
  signedInTeam,
  smallCellTable,
  uploadDataset,
} from './datasets-support'

afterAll(closeConnections)

const app = createTestApp()

let team: Awaited<ReturnType<typeof signedInTeam>>
let base: string
let versionId: number

beforeAll(async () => {
  team = await signedInTeam(app)
  const res = await uploadDataset(app, team.cookies.scientist, Buffer.from(smallCellTable()), 'cells.csv', {
    labId: team.lab.id,
  })
  expect(res.status).toBe(201)
  base = `/api/v1/datasets/${res.body.data.id}/versions/1`
  versionId = res.body.data.latestVersion.id
  const tagged = await putAs(app, team.cookies.scientist, `${base}/tagging`, {
    responseColumns: ['neurite_length_um'],
    conditionColumn: 'treatment',
    levels: ['lab', 'mouse'],
  })
  expect(tagged.status).toBe(200)
})

const tagging = {
  response: 'neurite_length_um',
  conditions: ['treatment'],
  covariates: [],
  levels: ['lab', 'mouse'],
}

describe('exclusions', () => {
  it('leave rows out by a numeric rule and by a unit, keep the rows stored, and record the reason', async () => {
    // smallCellTable: row k (0…39) holds 100.25 + (37 k mod 50); above 145 are k = 4, 8, 27, 31, 35 (by hand).
    const rule = await postAs(app, team.cookies.scientist, `${base}/exclusions`, {
      kind: 'rule',
      rule: { column: 'neurite_length_um', operator: 'gt', value: 145 },
      reason: 'Cells overlapped in the image',
    })
    expect(rule.status).toBe(201)
    expect(rule.body.data).toMatchObject({
      kind: 'rule',
      rule: { column: 'neurite_length_um', operator: 'gt', value: 145 },
      matchedRows: 5,
      reason: 'Cells overlapped in the image',
      removedAt: null,
    })

    const unit = await postAs(app, team.cookies.pi, `${base}/exclusions`, {
      kind: 'unit',
      unit: {
        path: [
          { column: 'lab', value: 'Fernhill' },
          { column: 'mouse', value: 'm2' },
        ],
      },
      reason: 'Culture contaminated',
    })
    expect(unit.status).toBe(201)
    expect(unit.body.data.matchedRows).toBe(5)

    const version = await getAs(app, team.cookies.biostatistician, base)
    // Fernhill m2 holds rows k = 25…29, so k = 27 matches both: 5 + 5 − 1 = 9 rows left out.
    expect(version.body.data.excludedRowCount).toBe(9)
    expect(version.body.data.exclusions).toHaveLength(2)

    const excluded = await getAs(app, team.cookies.scientist, `${base}/rows?show=excluded&pageSize=50`)
    expect(excluded.body.data.total).toBe(9)
    const overlap = excluded.body.data.rows.find(
      (r: { values: string[] }) =>
        r.values[0] === 'Fernhill' && r.values[1] === 'm2' && Number(r.values[4]) > 145,
    )
    expect(overlap.excludedBy).toEqual([rule.body.data.id, unit.body.data.id])
    const kept = await getAs(app, team.cookies.scientist, `${base}/rows?show=included&pageSize=50`)
    expect(kept.body.data.total).toBe(31)
    expect(kept.body.data.rows.every((r: { excludedBy: number[] }) => r.excludedBy.length === 0)).toBe(true)
    expect((await getAs(app, team.cookies.scientist, `${base}/rows`)).body.data.total).toBe(40)

    const columns = await loadNestedColumns(versionId, tagging)
    expect(columns.response.length).toBe(31)
    expect(Math.max(...columns.response)).toBeLessThanOrEqual(145)
    // Fernhill m2 is gone entirely; the other 7 mice remain.
    const units = new Set(
      Array.from(
        columns.levels[1].codes,
        (code, r) =>
          `${columns.levels[0].labels[columns.levels[0].codes[r]]}/${columns.levels[1].labels[code]}`,
      ),
    )
    expect(units.size).toBe(7)
    expect(units.has('Fernhill/m2')).toBe(false)

    const withdrawn = await deleteAs(app, team.cookies.scientist, `${base}/exclusions/${unit.body.data.id}`)
    expect(withdrawn.status).toBe(200)
    expect(withdrawn.body.data.removedAt).not.toBeNull()
    expect(withdrawn.body.data.removedBy.id).toBe(team.scientist.id)
    expect((await getAs(app, team.cookies.scientist, base)).body.data.excludedRowCount).toBe(5)
    expect((await loadNestedColumns(versionId, tagging)).response.length).toBe(35)
    // Withdrawn exclusions stay on record.
    const listed = await getAs(app, team.cookies.scientist, `${base}/exclusions`)
    expect(listed.body.data.map((e: { removedAt: string | null }) => e.removedAt !== null)).toEqual([
      false,
      true,
    ])
    expect(
      (await deleteAs(app, team.cookies.scientist, `${base}/exclusions/${unit.body.data.id}`)).status,
    ).toBe(409)
    await deleteAs(app, team.cookies.scientist, `${base}/exclusions/${rule.body.data.id}`)
  })

  it('compare text with equals or is-not only, take numbers for numeric columns, and find missing cells', async () => {
    const post = (body: object) => postAs(app, team.cookies.scientist, `${base}/exclusions`, body)
    const textLt = await post({
      kind: 'rule',
      rule: { column: 'mouse', operator: 'lt', value: 'm3' },
      reason: 'trying',
    })
    expect(textLt.status).toBe(400)
    expect(textLt.body.error.message).toContain('“mouse” holds text')
    const notNumber = await post({
      kind: 'rule',
      rule: { column: 'neurite_length_um', operator: 'ge', value: 'long' },
      reason: 'trying',
    })
    expect(notNumber.status).toBe(400)
    const unknown = await post({
      kind: 'rule',
      rule: { column: 'soma', operator: 'missing' },
      reason: 'trying',
    })
    expect(unknown.status).toBe(400)
    const noReason = await post({
      kind: 'rule',
      rule: { column: 'mouse', operator: 'eq', value: 'm1' },
      reason: ' ',
    })
    expect(noReason.status).toBe(400)
    const missing = await post({
      kind: 'rule',
      rule: { column: 'neurite_length_um', operator: 'missing' },
      reason: 'No tracing',
    })
    expect(missing.body.data.matchedRows).toBe(0)
    const eq = await post({
      kind: 'rule',
      rule: { column: 'mouse', operator: 'eq', value: ' m1 ' },
      reason: 'Mouse 1 was sick',
    })
    expect(eq.body.data).toMatchObject({ matchedRows: 10, rule: { value: 'm1' } })
    const nowhere = await post({
      kind: 'unit',
      unit: {
        path: [
          { column: 'lab', value: 'Nimbus' },
          { column: 'mouse', value: 'm9' },
        ],
      },
      reason: 'Typo check',
    })
    expect(nowhere.status).toBe(422)
    expect(nowhere.body.error.message).toContain('No rows belong to the unit lab “Nimbus” › mouse “m9”')
    for (const id of [missing.body.data.id, eq.body.data.id])
      await deleteAs(app, team.cookies.scientist, `${base}/exclusions/${id}`)
  })

  it('change what the tagging check sees: excluding the only unlabelled row lets the tagging pass', async () => {
    const table = smallCellTable().replace('\nNimbus,m3,vehicle,2,', '\nNimbus,,vehicle,2,')
    const res = await uploadDataset(app, team.cookies.scientist, Buffer.from(table), 'gap.csv', {
      labId: team.lab.id,
    })
    const path = `/api/v1/datasets/${res.body.data.id}/versions/1`
    const body = {
      responseColumns: ['neurite_length_um'],
      conditionColumn: 'treatment',
      levels: ['lab', 'mouse'],
    }
    const refused = await putAs(app, team.cookies.scientist, `${path}/tagging`, body)
    expect(refused.status).toBe(422)
    expect(refused.body.error.details.row).toBe(13)
    await postAs(app, team.cookies.scientist, `${path}/exclusions`, {
      kind: 'rule',
      rule: { column: 'mouse', operator: 'missing' },
      reason: 'Label lost',
    })
    const accepted = await putAs(app, team.cookies.scientist, `${path}/tagging`, body)
    expect(accepted.status).toBe(200)
    expect(accepted.body.data.design.observationCount).toBe(39)
  })
})
