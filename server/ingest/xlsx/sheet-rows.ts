import { badFile } from '../ingest-errors'
import type { WorkbookIndex } from './workbook-index'
import { readXml, type XmlGuard } from './xml-reader'

/** A row of a sheet as text: `values[k]` is column k + 1, null for an empty cell. */
export interface SheetRow {
  /** The row's number in the sheet (1-based). */
  number: number
  values: (string | null)[]
}

export interface SheetContext {
  sharedStrings: readonly string[]
  index: Pick<WorkbookIndex, 'dateStyles' | 'date1904'>
  maxCellChars: number
}

/** The limits of the format (ECMA-376; the spreadsheet programs' own): beyond them a reference is broken. */
const MAX_ROWS = 1_048_576
const MAX_COLUMNS = 16_384

const DAY_MS = 24 * 60 * 60 * 1000
/** Days from the spreadsheet's day 0 to 1970-01-01 (the 1900 system counts a day 60 that never was). */
const EPOCH_1900 = 25569
const EPOCH_1904 = 24107

/** A date serial as the spreadsheet shows it: the day alone at midnight, else date and time (UTC, to the second). */
export function dateText(serial: number, date1904: boolean): string | null {
  const ms = Math.round((serial - (date1904 ? EPOCH_1904 : EPOCH_1900)) * DAY_MS)
  const date = new Date(ms)
  if (Number.isNaN(date.getTime())) return null
  const iso = date.toISOString()
  return iso.endsWith('T00:00:00.000Z') ? iso.slice(0, 10) : iso.replace('.000Z', 'Z')
}

function numberText(text: string): string | null {
  const value = parseFloat(text)
  return Number.isFinite(value) ? String(value) : null
}

/** "AB12" → 27 (0-based column); -1 when the reference has no letters. */
function columnOf(ref: string): number {
  let column = 0
  let k = 0
  for (; k < ref.length; k++) {
    const c = ref.charCodeAt(k)
    if (c >= 65 && c <= 90) column = column * 26 + (c - 64)
    else if (c >= 97 && c <= 122) column = column * 26 + (c - 96)
    else break
    if (column > MAX_COLUMNS) return MAX_COLUMNS
  }
  return k === 0 ? -1 : column - 1
}

function brokenReference(what: string): Error {
  return badFile(
    'BROKEN_WORKBOOK',
    `The workbook could not be read: ${what}. Open it in the spreadsheet program and save it again, or export the sheet as CSV.`,
  )
}

/**
 * Reads a sheet part's rows as it unpacks, handing them on in batches (one per unpacked piece) to
 * `onRows`, whose promise is awaited before reading on. Cells show what the spreadsheet shows:
 * formulas by their stored result, shared and inline texts, TRUE/FALSE, numbers, dates (by the
 * cell's style) as ISO dates, and errors (#N/A, …) as empty. A cell's text longer than
 * `maxCellChars` stops the read with the row and column.
 */
export async function readSheetRows(
  pieces: AsyncIterable<string>,
  context: SheetContext,
  guard: XmlGuard,
  onRows: (rows: SheetRow[]) => Promise<void> | void,
): Promise<void> {
  const { sharedStrings, maxCellChars } = context
  const { dateStyles, date1904 } = context.index
  let batch: SheetRow[] = []
  let inData = false
  let row: SheetRow | null = null
  let lastRow = 0
  let nextColumn = 0
  // The cell being read.
  let column = -1
  let type = 'n'
  let style = 0
  let hasFormula = false
  let value: string | null = null
  let capture = false
  let phonetic = 0

  const tooLong = () =>
    badFile(
      'FIELD_TOO_LONG',
      `Row ${row?.number ?? lastRow + 1}, column ${column + 1}: the cell holds more than ${maxCellChars.toLocaleString('en-US')} characters, the most Nestwise accepts in one cell.`,
      { row: row?.number, columnNumber: column + 1, limit: 'cellChars' },
    )

  function cellValue(): string | null {
    if (value === null) return null
    switch (type) {
      case 's': {
        const text = sharedStrings[Number.parseInt(value, 10)]
        return text === undefined ? null : text
      }
      case 'str':
      case 'inlineStr':
      case 'd':
        return value
      case 'b':
        return Number.parseInt(value, 10) !== 0 ? 'TRUE' : 'FALSE'
      case 'e':
        return null
      default: {
        if (!hasFormula && dateStyles[style]) {
          const serial = parseFloat(value)
          return Number.isFinite(serial) ? dateText(serial, date1904) : null
        }
        return numberText(value)
      }
    }
  }

  await readXml(
    pieces,
    {
      open(name, a) {
        switch (name) {
          case 'sheetData':
            inData = true
            break
          case 'row': {
            if (!inData) break
            const number = a.r !== undefined ? Number.parseInt(a.r, 10) : lastRow + 1
            if (!(number > lastRow && number <= MAX_ROWS))
              throw brokenReference(`its rows are numbered out of order (row ${a.r} after row ${lastRow})`)
            row = { number, values: [] }
            lastRow = number
            nextColumn = 0
            break
          }
          case 'c':
            if (!row) break
            column = a.r !== undefined ? columnOf(a.r) : nextColumn
            if (column < 0 || column >= MAX_COLUMNS)
              throw brokenReference(`a cell has the reference "${a.r}" in row ${lastRow}`)
            nextColumn = column + 1
            type = a.t ?? 'n'
            style = a.s !== undefined ? Number.parseInt(a.s, 10) : 0
            hasFormula = false
            value = null
            phonetic = 0
            break
          case 'f':
            if (column >= 0) hasFormula = true
            break
          case 'v':
            if (column >= 0) {
              capture = true
              value = ''
            }
            break
          case 'is':
            if (column >= 0) value = ''
            break
          case 'rPh':
            phonetic++
            break
          case 't':
            if (column >= 0 && type === 'inlineStr' && phonetic === 0) {
              capture = true
              value ??= ''
            }
            break
        }
      },
      text(text) {
        if (!capture) return
        value += text
        if (value!.length > maxCellChars) throw tooLong()
      },
      close(name) {
        switch (name) {
          case 'v':
          case 't':
            capture = false
            break
          case 'rPh':
            phonetic--
            break
          case 'c':
            if (row && column >= 0) {
              const text = cellValue()
              if (text !== null) {
                while (row.values.length < column) row.values.push(null)
                row.values[column] = text
              }
            }
            column = -1
            break
          case 'row':
            if (row) batch.push(row)
            row = null
            break
          case 'sheetData':
            inData = false
            break
        }
      },
      async afterPiece() {
        if (!batch.length) return
        const rows = batch
        batch = []
        await onRows(rows)
      },
    },
    guard,
  )
}
