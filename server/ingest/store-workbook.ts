import { createHash } from 'node:crypto'
import { createReadStream } from 'node:fs'
import { finished } from 'node:stream/promises'
import { Transform } from 'node:stream'
import ExcelJS from 'exceljs'
import type { Knex } from 'knex'
import { createRowsTable, openCopyIn } from '../repositories/datasets-rows.repo'
import { encodeCopyTextRow } from './copy-text'
import { badFile } from './ingest-errors'
import { TableIntake, type IntakeLimits, type IntakeResult } from './table-intake'
import type { ProgressSink } from './upload-progress'
import { logger } from '../logger'

type CopyIn = Awaited<ReturnType<typeof openCopyIn>>

export interface StoreWorkbookResult {
  intake: IntakeResult
  sha256: string
  sheetName: string
  sheetNames: string[]
}

/** A cell as text, the way the spreadsheet shows its value (formulas by their result, errors as missing). */
export function cellText(value: ExcelJS.CellValue): string | null {
  if (value === null || value === undefined) return null
  if (typeof value === 'string') return value
  if (typeof value === 'number') return Number.isFinite(value) ? String(value) : null
  if (typeof value === 'boolean') return value ? 'TRUE' : 'FALSE'
  if (value instanceof Date) {
    const iso = value.toISOString()
    return iso.endsWith('T00:00:00.000Z') ? iso.slice(0, 10) : iso.replace('.000Z', 'Z')
  }
  if (typeof value === 'object') {
    if ('richText' in value && Array.isArray(value.richText))
      return value.richText.map((part) => part.text).join('')
    if ('error' in value) return null
    if ('result' in value) return cellText((value as { result?: ExcelJS.CellValue }).result ?? null)
    if ('formula' in value || 'sharedFormula' in value) return null
    if ('text' in value)
      return typeof value.text === 'string' ? value.text : cellText(value.text as ExcelJS.CellValue)
  }
  return String(value)
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

/**
 * Reads one sheet of an .xlsx with exceljs's streaming reader (first sheet unless `sheet` names one),
 * checks and profiles its rows like a CSV, and COPYs them in text format inside `trx`.
 * Row numbers in messages are the sheet's own. Empty rows are held back and only refused when more
 * data follows them (trailing empty rows are a common leftover of formatting).
 */
export async function storeWorkbook(
  trx: Knex.Transaction,
  versionId: number,
  path: string,
  sheet: string | undefined,
  limits: IntakeLimits,
  progress: ProgressSink,
): Promise<StoreWorkbookResult> {
  const intake = new TableIntake(limits, '.')
  const hash = createHash('sha256')
  let bytesRead = 0
  const counted = new Transform({
    transform(chunk: Buffer, _encoding, done) {
      hash.update(chunk)
      bytesRead += chunk.length
      done(null, chunk)
    },
  })
  const source = createReadStream(path).pipe(counted)
  const reader = new ExcelJS.stream.xlsx.WorkbookReader(source, {
    sharedStrings: 'cache',
    styles: 'cache',
    hyperlinks: 'ignore',
    worksheets: 'emit',
    entries: 'ignore',
  })

  const state: { copy: CopyIn | null; copyError: Error | null } = { copy: null, copyError: null }
  let sheetNames: string[] = []
  let sheetName: string | null = null
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

  try {
    let sheetIndex = -1
    let target = -1
    try {
      for await (const worksheet of reader) {
        sheetIndex++
        const model = (reader as unknown as { model?: { sheets?: { name: string }[] } }).model
        if (sheetIndex === 0) {
          sheetNames = (model?.sheets ?? []).map((s) => s.name)
          if (!sheetNames.length) sheetNames = [(worksheet as unknown as { name: string }).name]
          target = pickSheet(sheetNames, sheet)
        }
        const name = (worksheet as unknown as { name: string }).name
        if (name !== sheetNames[target]) {
          // Read through a sheet we skip: exceljs may be serving it from a temporary file that it
          // deletes as soon as we move on, and its stream, still opening, then fails uncaught.
          for await (const _row of worksheet as unknown as AsyncIterable<unknown>);
          continue
        }
        sheetName = name
        for await (const row of worksheet as unknown as AsyncIterable<ExcelJS.Row>) {
          const raw = row.values as ExcelJS.CellValue[]
          const values: (string | null)[] = []
          for (let c = 1; c < raw.length; c++) values.push(cellText(raw[c]))
          while (values.length && (values[values.length - 1] ?? '') === '') values.pop()
          const rowNumber = row.number
          // Rows the sheet skips entirely are empty rows too.
          for (let gap = lastRow + 1; gap < rowNumber && intake.columnNames; gap++) blankRows.push(gap)
          lastRow = rowNumber
          if (values.length === 0) {
            if (intake.columnNames) blankRows.push(rowNumber)
            continue
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
            continue
          }
          // Longer rows go to the intake as they are, which refuses them with the row number.
          if (values.length > width) intake.addRow(values, rowNumber)
          while (values.length < width) values.push(null)
          intake.addRow(values, rowNumber)
          out.push(encodeCopyTextRow(values))
          if (out.length >= 2000) {
            await write()
            progress.update({ phase: 'storing', bytesRead, rowsStored: intake.dataRows })
            progress.signal?.throwIfAborted()
          }
        }
      }
    } catch (error) {
      // Our own refusals and database errors pass through; anything else means exceljs could not read the file.
      if (
        (error as { status?: number }).status ||
        (error as { severity?: string }).severity ||
        state.copyError
      )
        throw error
      logger.warn('workbook could not be read', { versionId, err: error })
      throw badFile(
        'BROKEN_WORKBOOK',
        'The workbook could not be read: it may be damaged or protected with a password. Open it in the spreadsheet program and save it again, or export the sheet as CSV.',
      )
    }
    if (target === -1) throw badFile('BROKEN_WORKBOOK', 'The workbook has no sheets.')
    const result = intake.finish()
    await write()
    const stream = state.copy
    if (!stream) throw new Error('no rows table was created')
    stream.end()
    await finished(stream)
    if (stream.rowCount !== result.rowCount)
      throw new Error(`COPY stored ${stream.rowCount} rows where the sheet has ${result.rowCount}`)
    return { intake: result, sha256: hash.digest('hex'), sheetName: sheetName!, sheetNames }
  } catch (error) {
    const open = state.copy
    if (open && !open.writableFinished) {
      open.destroy()
      await new Promise((resolve) => setImmediate(resolve))
    }
    source.destroy()
    throw error
  }
}
