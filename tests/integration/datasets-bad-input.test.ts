import { readFileSync } from 'node:fs'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { db } from '../../server/db'
import request from 'supertest'
import { appWriteHeaders, closeConnections, createTestApp } from '../support/api'
import { putAs, signedInTeam, uploadDataset } from './datasets-support'

afterAll(closeConnections)

const app = createTestApp()
const fixture = (name: string) => readFileSync(new URL(`../fixtures/bad-input/${name}`, import.meta.url))

let team: Awaited<ReturnType<typeof signedInTeam>>
beforeAll(async () => {
  team = await signedInTeam(app)
})

async function rowsTableCount(): Promise<number> {
  const result = await db.raw(
    `SELECT count(*)::int AS n FROM pg_tables WHERE tablename ~ '^dataset_rows_[0-9]+$'`,
  )
  return result.rows[0].n
}

async function refused(file: Buffer, name: string) {
  const datasetsBefore = await db('datasets')
    .where({ lab_id: team.lab.id })
    .count<{ n: number }[]>('* as n')
    .first()
  const tablesBefore = await rowsTableCount()
  const res = await uploadDataset(app, team.cookies.scientist, file, name, {
    labId: team.lab.id,
    name: `bad ${name}`,
  })
  // Nothing of a refused upload stays behind: no dataset, no version, no rows table.
  const datasetsAfter = await db('datasets')
    .where({ lab_id: team.lab.id })
    .count<{ n: number }[]>('* as n')
    .first()
  expect(Number(datasetsAfter?.n)).toBe(Number(datasetsBefore?.n))
  expect(await rowsTableCount()).toBe(tablesBefore)
  return res
}

describe('bad files are refused with a message naming row and column', () => {
  const cases: {
    file: string
    status: number
    reason: string
    message: RegExp
    row?: number
    column?: string
  }[] = [
    { file: 'empty.csv', status: 400, reason: 'EMPTY_FILE', message: /The file is empty/ },
    {
      file: 'header-only.csv',
      status: 400,
      reason: 'HEADER_ONLY',
      message: /header row \(4 columns\) but no data rows/,
    },
    { file: 'one-row.csv', status: 422, reason: 'ONE_ROW', message: /only one data row/ },
    { file: 'picture.csv', status: 400, reason: 'BINARY_FILE', message: /does not contain text/ },
    {
      file: 'workbook-renamed.csv',
      status: 400,
      reason: 'WORKBOOK_AS_TEXT',
      message: /Excel workbook .* with a \.csv name/,
    },
    { file: 'old-excel.xls', status: 400, reason: 'OLD_EXCEL_FORMAT', message: /old Excel format/ },
    {
      file: 'notes.pdf',
      status: 400,
      reason: 'UNSUPPORTED_FILE_TYPE',
      message: /\.csv, \.tsv, \.txt or \.xlsx/,
    },
    {
      file: 'ragged-short-row.csv',
      status: 400,
      reason: 'RAGGED_ROW',
      message:
        /Row 7 has 3 values, but the header names 4 columns: values for column 4 \("neurite_length_um"\) onwards are missing/,
      row: 7,
    },
    {
      file: 'ragged-long-row.csv',
      status: 400,
      reason: 'RAGGED_ROW',
      message: /Row 10 has 5 values, but the header names only 4 columns/,
      row: 10,
    },
    {
      file: 'duplicate-header.csv',
      status: 400,
      reason: 'DUPLICATE_HEADER',
      message: /Columns 3 and 4 are both named "length"/,
      column: 'length',
    },
    {
      file: 'blank-header.csv',
      status: 400,
      reason: 'BLANK_HEADER',
      message: /Column 2 has no name in the header row/,
    },
    { file: 'blank-row-between.csv', status: 400, reason: 'BLANK_ROW', message: /Row 5 is empty/, row: 5 },
    {
      file: 'unterminated-quote.csv',
      status: 400,
      reason: 'UNTERMINATED_QUOTE',
      message: /Row 8, column 1 \("lab"\): a quoted value starts here but its closing quote never comes/,
      row: 8,
    },
    {
      file: 'text-after-quote.csv',
      status: 400,
      reason: 'TEXT_AFTER_QUOTE',
      message: /Row 8, column 1 \("lab"\): there is text after the closing quote/,
      row: 8,
    },
    {
      file: 'number-overflow.csv',
      status: 400,
      reason: 'NUMBER_OVERFLOW',
      message: /Row 11, column 4 \("neurite_length_um"\): 1e400 is too large/,
      row: 11,
      column: 'neurite_length_um',
    },
  ]
  for (const c of cases) {
    it(`${c.file} → ${c.status} ${c.reason}`, async () => {
      const res = await refused(fixture(c.file), c.file)
      expect(res.status, JSON.stringify(res.body)).toBe(c.status)
      expect(res.body.error.message).toMatch(c.message)
      expect(res.body.error.details.reason).toBe(c.reason)
      if (c.row !== undefined) expect(res.body.error.details.row).toBe(c.row)
      if (c.column !== undefined) expect(res.body.error.details.column).toBe(c.column)
    })
  }

  it('refuses more columns than the limit (500 by default)', async () => {
    const header = Array.from({ length: 501 }, (_, k) => `feature_${k + 1}`).join(',')
    const row = Array.from({ length: 501 }, (_, k) => String(k)).join(',')
    const res = await refused(Buffer.from(`${header}\n${row}\n${row}\n`), 'wide.csv')
    expect(res.status).toBe(400)
    expect(res.body.error.details.reason).toBe('TOO_MANY_COLUMNS')
    expect(res.body.error.message).toContain('501 columns; Nestwise accepts at most 500')
  })

  it('refuses a field longer than the limit (10,000 characters by default), naming row and column', async () => {
    const long = 'a'.repeat(10_001)
    const res = await refused(
      Buffer.from(`lab,note\nNimbus,short\nNimbus,${long}\nFernhill,short\n`),
      'long-note.csv',
    )
    expect(res.status).toBe(400)
    expect(res.body.error.details).toMatchObject({ reason: 'FIELD_TOO_LONG', row: 3, column: 'note' })
    expect(res.body.error.message).toContain('Row 3, column 2 ("note"): the value is 10,001 characters long')
  })

  it('does not guess the length of a field it stopped reading (a million characters is not "65,036")', async () => {
    const huge = 'a'.repeat(1_000_000)
    const res = await refused(Buffer.from(`lab,note\nNimbus,${huge}\nFernhill,short\n`), 'huge-note.csv')
    expect(res.status).toBe(400)
    expect(res.body.error.message).toBe(
      'Row 2, column 2 ("note"): the value is longer than 10,000 characters, the limit (reading stopped there). This often means a quote is never closed.',
    )
  })

  it('stops reading a never-closed quote at the field limit instead of swallowing the file', async () => {
    const rest = Array.from({ length: 2000 }, (_, k) => `Nimbus,m${k % 4},vehicle,${k}`).join('\n')
    const res = await refused(
      Buffer.from(`lab,mouse,treatment,length\n"Nimbus,m1,vehicle,1\n${rest}\n`),
      'open-quote.csv',
    )
    expect(res.status).toBe(400)
    expect(res.body.error.details).toMatchObject({ reason: 'FIELD_TOO_LONG', row: 2, column: 'lab' })
  })
})

describe('names with markup', () => {
  it('are stored and returned as plain text', async () => {
    const res = await uploadDataset(
      app,
      team.cookies.scientist,
      fixture('markup-in-names.csv'),
      'markup-in-names.csv',
      { labId: team.lab.id, name: '<i>Nimbus</i> run' },
    )
    expect(res.status).toBe(201)
    expect(res.body.data.name).toBe('<i>Nimbus</i> run')
    const version = await db('dataset_columns')
      .where({ version_id: res.body.data.latestVersion.id })
      .orderBy('position')
      .pluck('name')
    expect(version).toEqual(['lab', '<script>alert("x")</script>', 'treatment', '<b>length</b>'])
  })
})

describe('bad taggings are refused with the first offending row', () => {
  async function uploaded(name: string) {
    const res = await uploadDataset(app, team.cookies.scientist, fixture(name), name, { labId: team.lab.id })
    expect(res.status, JSON.stringify(res.body)).toBe(201)
    return res.body.data.id as number
  }
  const tag = (id: number, body: object) =>
    putAs(app, team.cookies.scientist, `/api/v1/datasets/${id}/versions/1/tagging`, body)
  const standard = {
    responseColumns: ['neurite_length_um'],
    conditionColumn: 'treatment',
    levels: ['lab', 'mouse'],
  }

  it('a response column that is not numeric → 400 naming row 8 and its value', async () => {
    const res = await tag(await uploaded('response-not-numeric.csv'), standard)
    expect(res.status).toBe(400)
    expect(res.body.error.message).toBe(
      '“neurite_length_um” cannot be a response: row 8 holds “n.d.”, which is not a number. Correct the file, or exclude such rows first.',
    )
    expect(res.body.error.details).toMatchObject({ column: 'neurite_length_um', row: 8 })
  })

  it('a condition arm with a single unit → 422', async () => {
    const res = await tag(await uploaded('condition-single-unit.csv'), standard)
    expect(res.status).toBe(422)
    expect(res.body.error.message).toContain('“NW-117” has only one “mouse” unit in the rows kept')
  })

  it('a condition with a single value → 422', async () => {
    const res = await tag(await uploaded('condition-single-value.csv'), standard)
    expect(res.status).toBe(422)
    expect(res.body.error.message).toContain('has a single value (“vehicle”)')
  })

  it('a row without a label at a level → 422 naming the row', async () => {
    const res = await tag(await uploaded('missing-label.csv'), standard)
    expect(res.status).toBe(422)
    expect(res.body.error.message).toContain('Row 12 has no value in “mouse”')
    expect(res.body.error.details).toMatchObject({ row: 12, column: 'mouse' })
  })

  it('unknown columns and a column used twice → 400', async () => {
    const id = await uploaded('condition-single-value.csv')
    expect((await tag(id, { ...standard, levels: ['lab', 'animal'] })).body.error.message).toBe(
      'This version has no column “animal”.',
    )
    const twice = await tag(id, { ...standard, levels: ['lab', 'treatment'] })
    expect(twice.status).toBe(400)
    expect(twice.body.error.details.issues[0].message).toContain('"treatment" is used twice')
  })

  it('a level that does not split its parent, or that is the rows themselves → 422', async () => {
    const id = await uploaded('condition-single-value.csv')
    const res = await tag(id, {
      responseColumns: ['neurite_length_um'],
      conditionColumn: null,
      levels: ['lab', 'mouse', 'treatment'],
    })
    expect(res.status).toBe(422)
    expect(res.body.error.message).toContain('“treatment” does not split “mouse”')
  })
})

describe('an upload that arrives incomplete', () => {
  /** A multipart body as the browser sends it, cut off before the closing boundary. */
  function truncatedBody(boundary: string, fileName: string): Buffer {
    return Buffer.from(
      [
        `--${boundary}`,
        'Content-Disposition: form-data; name="labId"',
        '',
        String(team.lab.id),
        `--${boundary}`,
        'Content-Disposition: form-data; name="projectName"',
        '',
        'Cut off',
        `--${boundary}`,
        `Content-Disposition: form-data; name="file"; filename="${fileName}"`,
        'Content-Type: text/csv',
        '',
        'lab,mouse,length',
        'Nimbus,m1,1.5',
        'Fernhill,m2,2.5',
      ].join('\r\n'),
    )
  }

  for (const fileName of ['cells.csv', 'cells.xlsx']) {
    it(`answers 400 for a body without its closing boundary (${fileName}) and stores nothing`, async () => {
      const boundary = 'nestwise-cut-off-boundary'
      const before = await db('datasets').where({ lab_id: team.lab.id }).count<{ n: number }[]>('* as n')
      const res = await request(app)
        .post('/api/v1/datasets')
        .set(appWriteHeaders)
        .set('Cookie', team.cookies.scientist)
        .set('Content-Type', `multipart/form-data; boundary=${boundary}`)
        .send(truncatedBody(boundary, fileName))
      expect(res.status, JSON.stringify(res.body)).toBe(400)
      expect(res.body.error).toMatchObject({
        code: 'INVALID_PAYLOAD',
        message: 'The upload arrived incomplete (the form ended early). Try again.',
      })
      const after = await db('datasets').where({ lab_id: team.lab.id }).count<{ n: number }[]>('* as n')
      expect(Number(after[0].n)).toBe(Number(before[0].n))
    })
  }
})

describe('header names in stray quotes', () => {
  it('are stored without the quotes', async () => {
    const res = await uploadDataset(
      app,
      team.cookies.scientist,
      Buffer.from('lab, "mouse","""length"""\nNimbus,m1,1.5\nFernhill,m2,2.5\n'),
      'quoted-header.csv',
      { labId: team.lab.id },
    )
    expect(res.status, JSON.stringify(res.body)).toBe(201)
    const names = await db('dataset_columns')
      .where({ version_id: res.body.data.latestVersion.id })
      .orderBy('position')
      .pluck('name')
    expect(names).toEqual(['lab', 'mouse', 'length'])
  })
})
