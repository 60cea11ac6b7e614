import { readFileSync } from 'node:fs'
import iconv from 'iconv-lite'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { loadNestedColumns } from '../../server/rows-store/read-back'
import { closeConnections, createTestApp } from '../support/api'
import { getAs, signedInTeam, uploadDataset } from './datasets-support'

afterAll(closeConnections)

const app = createTestApp()
const fixture = (name: string) => readFileSync(new URL(`../fixtures/encodings/${name}`, import.meta.url))

let team: Awaited<ReturnType<typeof signedInTeam>>
beforeAll(async () => {
  team = await signedInTeam(app)
})

async function upload(file: Buffer, name: string, sheet?: string) {
  const res = await uploadDataset(app, team.cookies.scientist, file, name, { labId: team.lab.id, sheet })
  expect(res.status, JSON.stringify(res.body)).toBe(201)
  const id = res.body.data.id as number
  const detail = await getAs(app, team.cookies.scientist, `/api/v1/datasets/${id}/versions/1`)
  const rows = await getAs(app, team.cookies.scientist, `/api/v1/datasets/${id}/versions/1/rows?pageSize=100`)
  return { id, version: detail.body.data, rows: rows.body.data }
}

describe('encodings', () => {
  it('reads Windows-1252 with µ and é, semicolons and decimal commas, CRLF', async () => {
    const { version, rows } = await upload(fixture('windows1252-semicolon-decimal-comma.csv'), 'messung.csv')
    expect(version).toMatchObject({
      encoding: 'windows-1252',
      delimiter: ';',
      decimalMark: ',',
      rowCount: 16,
    })
    expect(version.columns.map((c: { name: string }) => c.name)).toEqual([
      'Labor',
      'Maus',
      'Behandlung',
      'Neuritenlänge µm',
      'Notiz',
    ])
    const length = version.columns[3]
    // 100 + 1.25 k for k = 0…15: min 100, max 118.75, mean 109.375 (by hand).
    expect(length).toMatchObject({ type: 'numeric', min: 100, max: 118.75, mean: 109.375 })
    expect(rows.rows[2].values).toEqual(['Nimbus', 'm3', 'Vehikel', '102,50', 'Zelle größer, é'])
    // Decimal commas stay as written and are read as numbers on the way to the engine.
    const columns = await loadNestedColumns(version.id, {
      response: 'Neuritenlänge µm',
      conditions: ['Behandlung'],
      covariates: [],
      levels: ['Labor', 'Maus'],
    })
    expect(Array.from(columns.response.slice(0, 3))).toEqual([100, 101.25, 102.5])
    expect(columns.factors![0].labels).toEqual(['Vehikel', 'NW-117'])
  })

  it('reads the same table as UTF-8', async () => {
    const { version, rows } = await upload(fixture('utf8-semicolon-decimal-comma.csv'), 'messung-utf8.csv')
    expect(version).toMatchObject({ encoding: 'utf-8', delimiter: ';', decimalMark: ',' })
    expect(rows.rows[2].values[4]).toBe('Zelle größer, é')
  })

  it('drops a UTF-8 byte-order mark from the first column name', async () => {
    const { version } = await upload(fixture('utf8-bom.csv'), 'bom.csv')
    expect(version.encoding).toBe('utf-8')
    expect(version.columns[0].name).toBe('lab')
    expect(version.columns[3].name).toBe('neurite_length_µm')
  })

  it('reads UTF-16LE with BOM and tabs (spreadsheet "Unicode text")', async () => {
    const { version, rows } = await upload(fixture('utf16le-bom-tab.txt'), 'unicode.txt')
    expect(version).toMatchObject({ encoding: 'utf-16le', delimiter: '\t', rowCount: 16 })
    expect(version.columns[3]).toMatchObject({ name: 'neurite_length_µm', type: 'numeric' })
    expect(rows.rows[15].values).toEqual(['Fernhill', 'm4', 'NW-117', '122.5'])
  })

  it('re-reads as Windows-1252 a file whose first 64 KB are plain ASCII', async () => {
    const lines = ['lab,mouse,note,length']
    for (let k = 0; lines.join('\n').length < 70_000; k++) lines.push(`Nimbus,m${(k % 4) + 1},plain,${k}`)
    lines.push('Fernhill,m1,Zellkörper µ,7')
    const { version, rows } = await upload(
      iconv.encode(lines.join('\n') + '\n', 'windows-1252'),
      'late-latin1.csv',
    )
    expect(version.encoding).toBe('windows-1252')
    const last = await getAs(
      app,
      team.cookies.scientist,
      `/api/v1/datasets/${version.datasetId}/versions/1/rows?page=${Math.ceil(version.rowCount / 100)}&pageSize=100`,
    )
    expect(last.body.data.rows.at(-1).values).toEqual(['Fernhill', 'm1', 'Zellkörper µ', '7'])
    expect(rows.total).toBe(lines.length - 1)
  })
})

describe('delimiters, quotes and line endings', () => {
  it('reads tab-separated files', async () => {
    const { version } = await upload(fixture('plain.tsv'), 'plain.tsv')
    expect(version).toMatchObject({ delimiter: '\t', rowCount: 16, columnCount: 4 })
  })

  it('keeps quoted newlines, quoted delimiters and doubled quotes, with CRLF line endings', async () => {
    const { version, rows } = await upload(fixture('crlf-quoted-newlines.csv'), 'quoted.csv')
    expect(version).toMatchObject({ rowCount: 16, columnCount: 5 })
    expect(rows.rows[4].values[4]).toBe('first line\r\nsecond, with comma')
    expect(rows.rows[5].values[4]).toBe('said "bright"')
    expect(rows.rows[6].values[4]).toBeNull()
    // Rows are counted as records (header = row 1): the value spanning two lines counts once.
    expect(rows.rows[6].rowNumber).toBe(8)
  })

  it('stores a file with mixed line endings from the parsed rows', async () => {
    const { version, rows } = await upload(fixture('mixed-line-endings.csv'), 'mixed.csv')
    expect(version.rowCount).toBe(16)
    expect(rows.rows[0].values).toEqual(['Nimbus', 'm1', 'vehicle', '100.0'])
    expect(rows.rows[15].values).toEqual(['Fernhill', 'm4', 'NW-117', '122.5'])
  })

  it('keeps a quote inside an unquoted value as a character (PostgreSQL would read it as quoting)', async () => {
    const text = 'lab,label,length\nNimbus,5" coverslip,1.5\nNimbus,plain,2.5\nFernhill,"quoted, fine",3.5\n'
    const { version, rows } = await upload(Buffer.from(text), 'inch.csv')
    expect(version.rowCount).toBe(3)
    expect(rows.rows.map((r: { values: string[] }) => r.values[1])).toEqual([
      '5" coverslip',
      'plain',
      'quoted, fine',
    ])
  })

  it('ignores blank lines at the end of the file', async () => {
    const { version } = await upload(Buffer.from('a,b\n1,2\n3,4\n\n\r\n\n'), 'trailing.csv')
    expect(version.rowCount).toBe(2)
  })
})

describe('XLSX', () => {
  it('reads the first sheet by default and another sheet by name, with formulas and dates', async () => {
    const first = await uploadDataset(app, team.cookies.scientist, fixture('two-sheets.xlsx'), 'book.xlsx', {
      labId: team.lab.id,
    })
    // The first sheet holds one line of notes only: a header without data.
    expect(first.status).toBe(400)
    expect(first.body.error.details.reason).toBe('HEADER_ONLY')

    const { version, rows } = await upload(fixture('two-sheets.xlsx'), 'book.xlsx', 'Cells')
    expect(version).toMatchObject({
      fileType: 'xlsx',
      sheetName: 'Cells',
      sheetNames: ['Notes', 'Cells'],
      rowCount: 17,
      delimiter: null,
    })
    expect(version.columns.map((c: { type: string }) => c.type)).toEqual([
      'text',
      'text',
      'text',
      'numeric',
      'text',
    ])
    expect(rows.rows[0].values).toEqual(['Nimbus', 'm1', 'vehicle', '100', '2026-03-01'])
    // A formula cell is stored as the result the workbook shows.
    expect(rows.rows[16].values.slice(0, 4)).toEqual(['Fernhill', 'm4', 'NW-117', '201'])
    expect(rows.rows[16].values[4]).toBeNull()
  })

  it('names the sheets when the chosen one does not exist', async () => {
    const res = await uploadDataset(app, team.cookies.scientist, fixture('two-sheets.xlsx'), 'book.xlsx', {
      labId: team.lab.id,
      sheet: 'Cellz',
    })
    expect(res.status).toBe(400)
    expect(res.body.error.message).toBe(
      'The workbook has no sheet "Cellz". Its sheets are: "Notes", "Cells".',
    )
  })

  it('takes a sheet by number too', async () => {
    const { version } = await upload(fixture('two-sheets.xlsx'), 'book.xlsx', '2')
    expect(version.sheetName).toBe('Cells')
  })
})
