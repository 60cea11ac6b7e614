import { createHash } from 'node:crypto'
import { createReadStream } from 'node:fs'
import { stat } from 'node:fs/promises'
import { finished } from 'node:stream/promises'
import type { Knex } from 'knex'
import { createRowsTable, openCopyIn } from '../rows-store/rows-tables'
import { encodeCopyTextRow } from '../rows-store/copy-text'
import type { WorkbookLimits } from './ingest-config'
import { badFile } from './ingest-errors'
import { TableIntake, type IntakeLimits, type IntakeResult } from './table-intake'
import type { ProgressSink } from './progress-sink'
import { readSharedStrings } from './xlsx/shared-strings'
import { readSheetRows, type SheetRow } from './xlsx/sheet-rows'
import { readWorkbookIndex } from './xlsx/workbook-index'
import type { XmlGuard } from './xlsx/xml-reader'
import { openZipParts } from './xlsx/zip-parts'

type CopyIn = Awaited<ReturnType<typeof openCopyIn>>

export interface StoreWorkbookResult {
  intake: IntakeResult
  sha256: string
  sheetName: string
  sheetNames: string[]
}

function pickSheet(names: string[], wanted: string | undefined): number {
  if (!wanted) return 0
  const byName = names.indexOf(wanted)
  if (byName !== -1) return byName
  const number = Number(wanted)
  if (Number.isInteger(number) && number >= 1 && number <= names.length) return number - 1
  throw badFile(
    'SHEET_NOT_FOUND',
    `The workbook has no sheet "${wanted}". Its sheets are: ${names.map((n) => `"${n}"`).join(', ')}.`,
  )
}

/** Hashes the file as it is on disk (the workbook is read out of order, so not while parsing). */
async function sha256Of(path: string): Promise<string> {
  const hash = createHash('sha256')
  for await (const chunk of createReadStream(path, { highWaterMark: 1 << 20 })) hash.update(chunk as Buffer)
  return hash.digest('hex')
}

/**
 * Markup with more characters between two delimiters than a cell may hold (written out, an entity
 * such as &#1114111; takes ten characters for one) can only be an over-long text.
 */
function textGuard(maxCellChars: number, where: string): XmlGuard {
  return {
    maxRun: maxCellChars * 10 + 1024,
    tooLong: () =>
      badFile(
        'FIELD_TOO_LONG',
        `The workbook holds a text longer than ${maxCellChars.toLocaleString('en-US')} characters (in ${where}), the most Nestwise accepts in one cell. Shorten it, or export the sheet as CSV without that column.`,
        { limit: 'cellChars' },
      ),
  }
}

export interface StoreWorkbookInput {
  versionId: number
  /** The complete file on disk. */
  path: string
  /** Sheet name or 1-based number; the first sheet when not given. */
  sheet: string | undefined
  limits: IntakeLimits
  workbookLimits: WorkbookLimits
  progress: ProgressSink
}

/**
 * Reads one sheet of an .xlsx (the first unless `sheet` names one) part by part within the
 * workbook limits, checks and profiles its rows like a CSV, and COPYs them in text format inside
 * `trx`. Only the parts needed are unpacked: the workbook's list of sheets, its styles, its shared
 * texts and the chosen sheet. Row numbers in messages are the sheet's own. Empty rows are held
 * back and only refused when more data follows them (trailing empty rows are a common leftover of
 * formatting).
 */
export async function storeWorkbook(
  trx: Knex.Transaction,
  input: StoreWorkbookInput,
): Promise<StoreWorkbookResult> {
  const { versionId, limits, progress } = input
  const intake = new TableIntake(limits, '.')
  const hashing = sha256Of(input.path)
  hashing.catch(() => {})
  const parts = await openZipParts(input.path, input.workbookLimits)

  const state: { copy: CopyIn | null; copyError: Error | null } = { copy: null, copyError: null }
  let lastRow = 0
  let blankRows: number[] = []
  let width = 0
  let out: string[] = []

  const write = async () => {
    const copy = state.copy
    if (!copy || !out.length) return
    const ok = copy.write(Buffer.from(out.join(''), 'utf8'))
    out = []
    if (!ok) await new Promise((resolve) => (copy.once('drain', resolve), copy.once('error', resolve)))
    if (state.copyError) throw state.copyError
  }

  const take = async (row: SheetRow) => {
    const values = row.values
    while (values.length && (values[values.length - 1] ?? '') === '') values.pop()
    const rowNumber = row.number
    // Rows the sheet skips entirely are empty rows too.
    for (let gap = lastRow + 1; gap < rowNumber && intake.columnNames; gap++) blankRows.push(gap)
    lastRow = rowNumber
    if (values.length === 0) {
      if (intake.columnNames) blankRows.push(rowNumber)
      return
    }
    if (blankRows.length) intake.addRow([''], blankRows[0])
    blankRows = []
    if (!intake.columnNames) {
      intake.addRow(values, rowNumber)
      width = intake.columnNames!.length
      await createRowsTable(trx, versionId, width)
      const copy = await openCopyIn(trx, versionId, width, { kind: 'text' })
      copy.on('error', (error: Error) => {
        state.copyError ??= error
      })
      state.copy = copy
      return
    }
    // Longer rows go to the intake as they are, which refuses them with the row number.
    if (values.length > width) intake.addRow(values, rowNumber)
    for (let k = 0; k < width; k++) if (values[k] === undefined) values[k] = null
    intake.addRow(values, rowNumber)
    out.push(encodeCopyTextRow(values))
  }

  try {
    const guardFor = (where: string) => textGuard(limits.maxFieldChars, where)
    const index = await readWorkbookIndex(parts, guardFor("the workbook's own parts"))
    const sheetNames = index.sheets.map((s) => s.name)
    const target = index.sheets[pickSheet(sheetNames, input.sheet)]
    const sharedStrings = index.sharedStringsPart
      ? await readSharedStrings(
          parts,
          index.sharedStringsPart,
          input.workbookLimits,
          limits.maxFieldChars,
          guardFor('the texts the sheets share'),
        )
      : []
    if (!parts.has(target.part))
      throw badFile(
        'BROKEN_WORKBOOK',
        `The workbook lists the sheet "${target.name}" but does not contain it.`,
      )
    let fileBytes = 0
    try {
      fileBytes = (await stat(input.path)).size
    } catch {
      fileBytes = 0
    }
    const stated = parts.statedSize(target.part)
    let unpacked = 0
    const counted = async function* () {
      for await (const piece of parts.text(target.part, `the sheet "${target.name}"`)) {
        unpacked += piece.length
        yield piece
      }
    }
    await readSheetRows(
      counted(),
      { sharedStrings, index, maxCellChars: limits.maxFieldChars },
      guardFor(`the sheet "${target.name}"`),
      async (rows) => {
        for (const row of rows) await take(row)
        if (out.length >= 2000) {
          await write()
          const bytesRead = stated ? Math.min(fileBytes, Math.round((fileBytes * unpacked) / stated)) : 0
          progress.update({ phase: 'storing', bytesRead, rowsStored: intake.dataRows })
          progress.signal?.throwIfAborted()
        }
      },
    )
    const result = intake.finish()
    await write()
    const stream = state.copy
    if (!stream) throw new Error('no rows table was created')
    stream.end()
    await finished(stream)
    if (stream.rowCount !== result.rowCount)
      throw new Error(`COPY stored ${stream.rowCount} rows where the sheet has ${result.rowCount}`)
    return { intake: result, sha256: await hashing, sheetName: target.name, sheetNames }
  } catch (error) {
    const open = state.copy
    if (open && !open.writableFinished) {
      open.destroy()
      await new Promise((resolve) => setImmediate(resolve))
    }
    throw error
  } finally {
    parts.close()
  }
}
