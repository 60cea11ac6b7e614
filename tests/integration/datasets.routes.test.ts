import { afterAll, describe, expect, it } from 'vitest'
import { closeConnections, createTestApp } from '../support/api'
import { getAs, signedInTeam, smallCellTable, uploadDataset } from './datasets-support'

afterAll(closeConnections)

const app = createTestApp()

describe('POST /api/v1/datasets', () => {
  it('stores a CSV, profiles its columns and suggests the nesting', async () => {
    const team = await signedInTeam(app)
    const res = await uploadDataset(app, team.cookies.scientist, Buffer.from(smallCellTable()), 'outgrowth.csv', { labId: team.lab.id })
    expect(res.status, JSON.stringify(res.body)).toBe(201)
    const dataset = res.body.data
    expect(dataset).toMatchObject({ name: 'outgrowth', labId: team.lab.id, project: { name: 'Neurite outgrowth' }, versionCount: 1 })
    expect(dataset.latestVersion).toMatchObject({ versionNo: 1, rowCount: 40, columnCount: 5, delimiter: ',', encoding: 'utf-8', status: 'ready' })
    const detail = await getAs(app, team.cookies.biostatistician, `/api/v1/datasets/${dataset.id}/versions/1`)
    expect(detail.status).toBe(200)
    expect(detail.body.data.columns.map((c: { type: string }) => c.type)).toEqual(['text', 'text', 'text', 'integer', 'numeric'])
    expect(detail.body.data.suggestion).toMatchObject({ conditionColumn: 'treatment', responseColumns: ['neurite_length_um'] })
    expect(detail.body.data.suggestion.levels.map((l: { column: string }) => l.column)).toEqual(['lab', 'mouse'])
  })
})
