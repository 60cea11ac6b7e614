import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { hugeCellWorkbook, sharedStringsBomb, smallWorkbook } from '../support/xlsx-files'

// The workbook limits follow the upload limit, read when the configuration loads: 1 MB gives the
// floors (16 MB a part, 32 MB in all, 4 MB of shared texts, 50,000 of them), so the hostile files
// stay small enough to make in the test.
process.env.UPLOAD_MAX_MB = '1'
const { closeConnections, createTestApp } = await import('../support/api')
const { db } = await import('../../server/db')
const { signedInTeam, uploadDataset } = await import('./datasets-support')
delete process.env.UPLOAD_MAX_MB

afterAll(() => closeConnections())

const app = createTestApp()
let team: Awaited<ReturnType<typeof signedInTeam>>
beforeAll(async () => {
  team = await signedInTeam(app)
})

async function refused(file: Buffer) {
  const res = await uploadDataset(app, team.cookies.scientist, file, 'book.xlsx', { labId: team.lab.id })
  expect(res.status, JSON.stringify(res.body)).toBe(400)
  expect(await db('datasets').where({ lab_id: team.lab.id }).first()).toBeUndefined()
  return res.body.error as { code: string; message: string; details: { reason: string; limit?: string } }
}

describe('workbooks that unpack far beyond their size (archive bombs)', () => {
  it('refuses shared texts that unpack past a quarter of the upload limit, naming the part and the limit', async () => {
    // 300,000 entries unpack to 4.9 MB from a file of a few kilobytes.
    const error = await refused(await sharedStringsBomb(300_000))
    expect(error.details).toEqual({ reason: 'WORKBOOK_LIMIT', limit: 'sharedStringsBytes' })
    expect(error.message).toBe(
      "The workbook's part xl/sharedStrings.xml (the texts the sheets share) unpacks to 4.9 MB, more than the 4 MB Nestwise reads for it. The limits follow the upload limit (UPLOAD_MAX_MB).",
    )
  })

  it('stops a part that unpacks past the size its archive states', async () => {
    const error = await refused(await sharedStringsBomb(300_000, { lie: true }))
    expect(error.details).toEqual({ reason: 'WORKBOOK_LIMIT', limit: 'statedSize' })
  })

  it('refuses more shared texts than the limit', async () => {
    const error = await refused(await sharedStringsBomb(60_000))
    expect(error.details).toEqual({ reason: 'WORKBOOK_LIMIT', limit: 'sharedStrings' })
    expect(error.message).toMatch(/more than 50,000 shared texts/)
  })

  it('refuses a 600-million-character cell (a 570 KB file) by what it unpacks to, not as damaged', async () => {
    // At the default limits its sheet is within the part limit and the cell length stops it (see
    // server/ingest/xlsx/workbook-reader.test.ts); at 1 MB the stated total already does.
    const error = await refused(await hugeCellWorkbook(600_000_000, 'inline'))
    expect(error.details).toEqual({ reason: 'WORKBOOK_LIMIT', limit: 'totalBytes' })
    expect(error.message).toMatch(/^The workbook unpacks to 572 MB, more than the 32 MB Nestwise reads/)
  })

  it('refuses one enormous inline text while reading the sheet', async () => {
    const error = await refused(await hugeCellWorkbook(3_000_000, 'inline'))
    expect(error.details).toEqual({ reason: 'FIELD_TOO_LONG', limit: 'cellChars' })
    expect(error.message).toMatch(/holds a text longer than 10,000 characters \(in the sheet "Cells"\)/)
  })

  it('refuses one enormous shared text the same way', async () => {
    const error = await refused(await hugeCellWorkbook(3_000_000, 'shared'))
    expect(error.details).toEqual({ reason: 'FIELD_TOO_LONG', limit: 'cellChars' })
  })

  it('still stores an ordinary workbook', async () => {
    const res = await uploadDataset(app, team.cookies.scientist, await smallWorkbook(), 'small.xlsx', {
      labId: team.lab.id,
    })
    expect(res.status, JSON.stringify(res.body)).toBe(201)
    expect(res.body.data.latestVersion).toMatchObject({ fileType: 'xlsx', rowCount: 2, sheetName: 'Cells' })
  })
})
