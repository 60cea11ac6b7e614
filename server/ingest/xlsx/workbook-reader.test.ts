import { mkdtempSync, rmSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { afterAll, describe, expect, it } from 'vitest'
import {
  cellsWorkbook,
  hugeCellWorkbook,
  paddedSheetBomb,
  sharedStringsBomb,
  sharedStringsXml,
  sheetXml,
  writeWorkbook,
} from '../../../tests/support/xlsx-files'
import { ingestConfig, type WorkbookLimits } from '../ingest-config'
import { readSharedStrings } from './shared-strings'
import { dateText, readSheetRows, type SheetRow } from './sheet-rows'
import { isDateFormatCode, readWorkbookIndex } from './workbook-index'
import type { XmlGuard } from './xml-reader'
import { openZipParts } from './zip-parts'

const dir = mkdtempSync(join(tmpdir(), 'nestwise-xlsx-'))
afterAll(() => rmSync(dir, { recursive: true, force: true }))

const MB = 1024 * 1024
const limits: WorkbookLimits = {
  partBytes: 2 * MB,
  totalBytes: 4 * MB,
  sharedStringsBytes: 1 * MB,
  sharedStrings: 10_000,
  entries: 100,
  maxRatio: 100,
  ratioFloorBytes: 8 * MB,
}
const MAX_CELL = 1000
const guard: XmlGuard = {
  maxRun: MAX_CELL * 10 + 1024,
  tooLong: () => Object.assign(new Error('run too long'), { status: 400, details: { limit: 'cellChars' } }),
}

let files = 0
async function saved(book: Promise<Buffer> | Buffer): Promise<string> {
  const path = join(dir, `book-${++files}.xlsx`)
  writeFileSync(path, await book)
  return path
}

/** Reads a sheet the way store-workbook does: index, shared texts, then the rows. */
async function readBook(path: string, sheet = 0, lim = limits) {
  const parts = await openZipParts(path, lim)
  try {
    const index = await readWorkbookIndex(parts, guard)
    const shared = index.sharedStringsPart
      ? await readSharedStrings(parts, index.sharedStringsPart, lim, MAX_CELL, guard)
      : []
    const rows: SheetRow[] = []
    const target = index.sheets[sheet]
    await readSheetRows(
      parts.text(target.part, 'a sheet'),
      { sharedStrings: shared, index, maxCellChars: MAX_CELL },
      guard,
      (batch) => void rows.push(...batch),
    )
    return { index, rows }
  } finally {
    parts.close()
  }
}

async function refusal(promise: Promise<unknown>) {
  try {
    await promise
  } catch (error) {
    return error as Error & { status?: number; details?: { reason?: string; limit?: string } }
  }
  throw new Error('expected the workbook to be refused')
}

describe('reading a sheet', () => {
  it('shows what the spreadsheet shows: texts, numbers, booleans, dates by style, formula results, errors as empty', async () => {
    const path = await saved(
      writeWorkbook({
        sheets: [
          { name: 'Notes', xml: sheetXml([['just notes']]) },
          {
            name: 'Cells',
            xml: sheetXml([
              ['lab', 'n', 'ok', 'day', 'custom day', 'sum', 'label', 'error', 'rich', 'two places'],
              [
                { xml: '<c t="s"><v>0</v></c>' },
                1.5,
                true,
                { xml: '<c s="1"><v>46082</v></c>' },
                { xml: '<c s="2"><v>46082.5</v></c>' },
                { xml: '<c><f>B2*2</f><v>3</v></c>' },
                { xml: '<c t="str"><f>A2&amp;"!"</f><v>Nimbus!</v></c>' },
                { xml: '<c t="e"><v>#N/A</v></c>' },
                { xml: '<c t="inlineStr"><is><r><t>Fern</t></r><r><t>hill</t></r></is></c>' },
                { xml: '<c s="3"><v>2.5</v></c>' },
              ],
              [{ xml: '<c t="s"><v>1</v></c>' }, { xml: '<c><f>1/0</f></c>' }, false],
            ]),
          },
        ],
        sharedStrings: sharedStringsXml(['Nimbus', 'Fern & hill']),
      }),
    )
    const { index, rows } = await readBook(path, 1)
    expect(index.sheets.map((s) => s.name)).toEqual(['Notes', 'Cells'])
    expect(rows.map((r) => r.number)).toEqual([1, 2, 3])
    expect(rows[1].values).toEqual([
      'Nimbus',
      '1.5',
      'TRUE',
      '2026-03-01',
      '2026-03-01T12:00:00Z',
      '3',
      'Nimbus!',
      null,
      'Fernhill',
      '2.5',
    ])
    expect(rows[2].values).toEqual(['Fern & hill', null, 'FALSE'])
  })

  it('fills skipped cells with empties and numbers rows and cells without references consecutively', async () => {
    const path = await saved(
      writeWorkbook({
        sheets: [
          {
            name: 'S',
            xml: () => [
              '<worksheet xmlns="http://schemas.openxmlformats.org/spreadsheetml/2006/main"><sheetData>',
              '<row><c t="inlineStr"><is><t>a</t></is></c><c t="inlineStr"><is><t>b</t></is></c></row>',
              '<row r="4"><c r="C4"><v>7</v></c></row>',
              '<row><c><v>1</v></c><c><v>2</v></c></row>',
              '</sheetData></worksheet>',
            ],
          },
        ],
      }),
    )
    const { rows } = await readBook(path)
    expect(rows).toEqual([
      { number: 1, values: ['a', 'b'] },
      { number: 4, values: [null, null, '7'] },
      { number: 5, values: ['1', '2'] },
    ])
  })

  it('reads parts whose writer prefixes the main namespace, and leaves phonetic guides out', async () => {
    const path = await saved(
      writeWorkbook({
        sheets: [
          {
            name: 'S',
            xml: () => [
              '<x:worksheet xmlns:x="http://schemas.openxmlformats.org/spreadsheetml/2006/main"><x:sheetData>',
              '<x:row r="1"><x:c r="A1" t="s"><x:v>0</x:v></x:c></x:row>',
              '</x:sheetData></x:worksheet>',
            ],
          },
        ],
        sharedStrings: () => [
          '<sst xmlns="http://schemas.openxmlformats.org/spreadsheetml/2006/main"><si><t>mouse</t><rPh sb="0" eb="1"><t>MA-U-SU</t></rPh></si></sst>',
        ],
      }),
    )
    expect((await readBook(path)).rows[0].values).toEqual(['mouse'])
  })

  it('counts dates from 1904 when the workbook says so', async () => {
    expect(dateText(0, true)).toBe('1904-01-01')
    expect(dateText(25569, false)).toBe('1970-01-01')
    const path = await saved(
      writeWorkbook({
        date1904: true,
        sheets: [{ name: 'S', xml: sheetXml([[{ xml: '<c s="1"><v>44620</v></c>' }]]) }],
      }),
    )
    expect((await readBook(path)).rows[0].values).toEqual(['2026-03-01'])
  })

  it('tells date formats from number formats by their letters outside quotes and brackets', () => {
    expect(isDateFormatCode('yyyy-mm-dd')).toBe(true)
    expect(isDateFormatCode('[h]:mm:ss')).toBe(true)
    expect(isDateFormatCode('0.00" mm"')).toBe(false)
    expect(isDateFormatCode('[Red]#,##0.00')).toBe(false)
    expect(isDateFormatCode('#,##0 "days"')).toBe(false)
  })

  it('refuses a cell longer than the limit with its row and column', async () => {
    const path = await saved(
      writeWorkbook({ sheets: [{ name: 'S', xml: sheetXml([['lab'], ['x'.repeat(MAX_CELL + 1)]]) }] }),
    )
    const error = await refusal(readBook(path))
    expect(error.message).toMatch(/^Row 2, column 1: the cell holds more than 1,000 characters/)
    expect(error.details).toMatchObject({ reason: 'FIELD_TOO_LONG', limit: 'cellChars' })
  })

  it('refuses rows that run backwards, and references beyond the last column', async () => {
    const backwards = await saved(
      writeWorkbook({
        sheets: [
          {
            name: 'S',
            xml: () => ['<worksheet><sheetData><row r="3"/><row r="2"/></sheetData></worksheet>'],
          },
        ],
      }),
    )
    expect((await refusal(readBook(backwards))).details?.reason).toBe('BROKEN_WORKBOOK')
    const wide = await saved(
      writeWorkbook({
        sheets: [
          {
            name: 'S',
            xml: () => [
              '<worksheet><sheetData><row r="1"><c r="ZZZZZZ1"><v>1</v></c></row></sheetData></worksheet>',
            ],
          },
        ],
      }),
    )
    expect((await refusal(readBook(wide))).message).toMatch(/reference "ZZZZZZ1"/)
  })

  it('calls XML that is not well-formed a damaged workbook', async () => {
    const path = await saved(
      writeWorkbook({ sheets: [{ name: 'S', xml: () => ['<worksheet><sheetData><row r="1"><c></row>'] }] }),
    )
    expect((await refusal(readBook(path))).details?.reason).toBe('BROKEN_WORKBOOK')
  })
})

describe('workbook limits, checked while unpacking', () => {
  it('refuses a shared-texts part that states more than its limit before unpacking any of it', async () => {
    const path = await saved(sharedStringsBomb(100_000))
    const error = await refusal(readBook(path))
    expect(error.details).toMatchObject({ reason: 'WORKBOOK_LIMIT', limit: 'sharedStringsBytes' })
    expect(error.message).toMatch(
      /xl\/sharedStrings\.xml \(the texts the sheets share\) unpacks to 1\.6 MB, more than the 1 MB/,
    )
  })

  it('stops a part that unpacks to more than its archive states', async () => {
    const path = await saved(sharedStringsBomb(100_000, { lie: true }))
    const error = await refusal(readBook(path))
    expect(error.details).toMatchObject({ reason: 'WORKBOOK_LIMIT', limit: 'statedSize' })
  })

  it('counts shared texts', async () => {
    const path = await saved(sharedStringsBomb(20_000))
    const error = await refusal(readBook(path))
    expect(error.details).toMatchObject({ reason: 'WORKBOOK_LIMIT', limit: 'sharedStrings' })
    expect(error.message).toMatch(/more than 10,000 shared texts/)
  })

  it('refuses one enormous text before the parser holds it, shared or inline', async () => {
    for (const where of ['shared', 'inline'] as const) {
      const error = await refusal(readBook(await saved(hugeCellWorkbook(200_000, where))))
      expect(error.details, where).toMatchObject({ limit: 'cellChars' })
    }
  })

  it('refuses a sheet part over the part limit, and archives over the total limit', async () => {
    const padded = await refusal(readBook(await saved(paddedSheetBomb(400_000))))
    expect(padded.details).toMatchObject({ reason: 'WORKBOOK_LIMIT', limit: 'partBytes' })
    const liar = await refusal(readBook(await saved(paddedSheetBomb(400_000, { lie: true }))))
    expect(liar.details).toMatchObject({ reason: 'WORKBOOK_LIMIT', limit: 'statedSize' })
    const many = await refusal(
      readBook(await saved(paddedSheetBomb(400_000)), 0, {
        ...limits,
        partBytes: 8 * MB,
        totalBytes: 2 * MB,
      }),
    )
    expect(many.details).toMatchObject({ reason: 'WORKBOOK_LIMIT', limit: 'totalBytes' })
  })

  it('at the default limits, refuses the 570 KB file with a 600-million-character cell by its unpacking, not as damaged', async () => {
    const path = await saved(hugeCellWorkbook(600_000_000, 'inline'))
    const error = await refusal(readBook(path, 0, ingestConfig.workbook))
    expect(error.details).toMatchObject({ reason: 'WORKBOOK_LIMIT', limit: 'ratio' })
    expect(error.message).toMatch(
      /xl\/worksheets\/sheet1\.xml \(a sheet\) unpacks to 572 MB from 5\d\d KB, 1,0\d\d times its packed size/,
    )
  })

  it('refuses a part that unpacks hundreds of times its packed size, but not an ordinary sheet', async () => {
    const wide = { ...limits, partBytes: 64 * MB, totalBytes: 64 * MB }
    const padded = await refusal(readBook(await saved(paddedSheetBomb(2_000_000)), 0, wide))
    expect(padded.details).toMatchObject({ reason: 'WORKBOOK_LIMIT', limit: 'ratio' })
    expect(padded.message).toMatch(/unpacks to 11 MB from \d+ KB, [\d,]+ times its packed size/)
    const { rows } = await readBook(await saved(cellsWorkbook(80_000)), 0, { ...wide, ratioFloorBytes: MB })
    expect(rows).toHaveLength(80_001)
  })

  it('calls a file that is no zip archive a damaged workbook', async () => {
    const path = await saved(Buffer.from('PK\u0003\u0004 not really a zip'))
    expect((await refusal(readBook(path))).details?.reason).toBe('BROKEN_WORKBOOK')
  })
})
