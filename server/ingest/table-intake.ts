import { suggestNesting } from '../../shared/nesting/suggest-nesting'
import type { ColumnProfile, NestingSuggestion } from '../../shared/schemas/datasets'
import { ColumnProfiler, type ColumnCodes, type ProfilerOptions } from './column-profiler'
import { rowFields, type CsvRow } from './csv-tokenizer'
import { badFile, describeColumn, thinFile } from './ingest-errors'
import type { DecimalMark } from '../rows-store/number-text'

export interface IntakeLimits {
  maxColumns: number
  maxFieldChars: number
  maxNameChars: number
  naValues: readonly string[]
  distinctCap: number
}

export interface IntakeResult {
  headerRow: number
  columnNames: string[]
  rowCount: number
  profiles: ColumnProfile[]
  codes: (ColumnCodes | null)[]
  /** The nesting suggested from the codes kept during the pass (no second pass over the rows). */
  suggestion: NestingSuggestion
}

const formatCount = (n: number) => n.toLocaleString('en-US')

const WRAPPING_QUOTES: [string, string][] = [
  ['"', '"'],
  ["'", "'"],
  ['\u201c', '\u201d'],
  ['\u201e', '\u201c'],
  ['\u00ab', '\u00bb'],
]

/**
 * A header cell as a column name: trimmed, and without quotes wrapped around the whole name. A
 * name arrives quoted when the quotes were not read as CSV quoting (a space before the opening
 * quote, quotes doubled once too often by an export, quotes typed into a spreadsheet cell).
 */
export function headerName(raw: string | null): string {
  let name = (raw ?? '').trim()
  for (;;) {
    const pair = WRAPPING_QUOTES.find(
      ([open, close]) => name.length >= 2 && name.startsWith(open) && name.endsWith(close),
    )
    if (!pair) return name
    name = name.slice(pair[0].length, name.length - pair[1].length).trim()
  }
}

/**
 * Receives the rows of a table (from CSV or XLSX), checks the header and the shape of every row,
 * and feeds each cell to its column's profiler. Throws messages a scientist can act on, naming row
 * (header = row 1, as a spreadsheet numbers it) and column.
 */
export class TableIntake {
  columnNames: string[] | null = null
  dataRows = 0
  /** File row of the header; data row i (0-based) is file row headerRow + 1 + i. */
  private headerRow = 1
  private profilers: ColumnProfiler[] = []
  private readonly profilerOptions: ProfilerOptions

  constructor(
    private readonly limits: IntakeLimits,
    decimalMark: DecimalMark,
  ) {
    this.profilerOptions = {
      decimalMark,
      naValues: new Set(limits.naValues),
      naBytes: limits.naValues.map((value) => Buffer.from(value, 'utf8')),
      distinctCap: limits.distinctCap,
    }
  }

  /** `row` is the 1-based row number of these values in the file. Cells may be null (an empty spreadsheet cell). */
  addRow(values: readonly (string | null)[], row: number): void {
    if (this.columnNames === null) {
      this.headerRow = row
      this.acceptHeader(values)
      return
    }
    const names = this.columnNames
    if (values.length !== names.length) this.raggedRow(values, row)
    const maxChars = this.limits.maxFieldChars
    for (let k = 0; k < values.length; k++) {
      const value = values[k]
      if (value !== null && value.length > maxChars) this.fieldTooLong(row, k, value.length)
      this.profilers[k].add(value)
    }
    this.dataRows++
  }

  /**
   * A row from the CSV reader, as bytes. The reader has already refused fields over the length
   * limit (it is given the same limit), so only the shape is checked here.
   */
  addCsvRow(row: CsvRow, recordNo: number): void {
    const names = this.columnNames
    if (names === null || row.count !== names.length) {
      this.addRow(rowFields(row), recordNo)
      return
    }
    const { bytes, starts, ends } = row
    for (let k = 0; k < row.count; k++) this.profilers[k].addBytes(bytes, starts[k], ends[k])
    this.dataRows++
  }

  private acceptHeader(values: readonly (string | null)[]): void {
    const { maxColumns, maxNameChars } = this.limits
    if (values.length > maxColumns) {
      throw badFile(
        'TOO_MANY_COLUMNS',
        `The header row has ${formatCount(values.length)} columns; Nestwise accepts at most ${formatCount(maxColumns)}. Remove the columns you do not need and upload again.`,
        { row: 1 },
      )
    }
    const names: string[] = []
    const firstIndex = new Map<string, number>()
    values.forEach((raw, k) => {
      const name = headerName(raw)
      if (name === '') {
        const onlyColumn = values.length === 1
        throw badFile(
          'BLANK_HEADER',
          onlyColumn
            ? 'The first row is empty. Nestwise reads the first row as the column names.'
            : `Column ${k + 1} has no name in the header row (row 1). Give every column a name and upload again.`,
          { row: 1, columnNumber: k + 1 },
        )
      }
      if (name.length > maxNameChars) {
        throw badFile(
          'NAME_TOO_LONG',
          `The name of column ${k + 1} is ${formatCount(name.length)} characters long; names can have at most ${maxNameChars}. Is row 1 really the header?`,
          { row: 1, columnNumber: k + 1 },
        )
      }
      const earlier = firstIndex.get(name)
      if (earlier !== undefined) {
        throw badFile(
          'DUPLICATE_HEADER',
          `Columns ${earlier + 1} and ${k + 1} are both named "${name}". Give each column its own name and upload again.`,
          { row: 1, column: name, columnNumber: k + 1 },
        )
      }
      firstIndex.set(name, k)
      names.push(name)
    })
    this.columnNames = names
    this.profilers = names.map((name, k) => new ColumnProfiler(k + 1, name, this.profilerOptions))
  }

  private raggedRow(values: readonly (string | null)[], row: number): never {
    const expected = this.columnNames!.length
    if (values.length === 1 && (values[0] ?? '') === '') {
      throw badFile('BLANK_ROW', `Row ${row} is empty. Remove empty lines between rows and upload again.`, {
        row,
      })
    }
    const valuesWord = values.length === 1 ? 'value' : 'values'
    throw badFile(
      'RAGGED_ROW',
      values.length < expected
        ? `Row ${row} has ${values.length} ${valuesWord}, but the header names ${expected} columns: values for ${describeColumn(values.length, this.columnNames![values.length])} onwards are missing. Check for a missing delimiter in that row.`
        : `Row ${row} has ${values.length} values, but the header names only ${expected} columns. Check for an extra delimiter, or a value with a delimiter that should be in quotes.`,
      { row, columnNumber: Math.min(values.length, expected) + (values.length < expected ? 1 : 0) },
    )
  }

  /** `unfinished`: reading stopped inside the value, so its whole length is not known. */
  fieldTooLong(row: number, index: number, length: number, unfinished = false): never {
    const name = this.columnNames?.[index]
    const limit = formatCount(this.limits.maxFieldChars)
    const size = unfinished
      ? `the value is longer than ${limit} characters, the limit (reading stopped there)`
      : `the value is ${formatCount(length)} characters long; the limit is ${limit}`
    throw badFile(
      'FIELD_TOO_LONG',
      `Row ${row}, ${describeColumn(index, name)}: ${size}. This often means a quote is never closed.`,
      { row, column: name, columnNumber: index + 1 },
    )
  }

  /** Expected number of data rows (an estimate from the file size); profilers reserve room for them. */
  reserveRows(rows: number): void {
    for (const profiler of this.profilers) profiler.reserve(rows)
  }

  /**
   * The checks that need the whole file (empty, header only, one row, numbers out of range), then
   * the profiles and the suggested nesting. Ingest calls it while PostgreSQL finishes the COPY.
   */
  finish(): IntakeResult {
    if (this.columnNames === null) throw badFile('EMPTY_FILE', 'The file is empty.')
    if (this.dataRows === 0) {
      throw badFile(
        'HEADER_ONLY',
        `The file has a header row (${this.columnNames.length} columns) but no data rows.`,
        { row: 1 },
      )
    }
    if (this.dataRows === 1) {
      throw thinFile(
        'ONE_ROW',
        'The file has only one data row. Nestwise needs many observations per unit to say anything about variation; upload the full table.',
      )
    }
    for (const profiler of this.profilers) {
      const overflow = profiler.overflow
      if (overflow && (profiler.type === 'numeric' || profiler.type === 'integer')) {
        const row = this.headerRow + 1 + overflow.rowIndex
        throw badFile(
          'NUMBER_OVERFLOW',
          `Row ${row}, ${describeColumn(profiler.position - 1, profiler.name)}: ${overflow.text} is too large to store as a number (the largest is about 1.8e308). Check the value or its unit.`,
          { row, column: profiler.name, columnNumber: profiler.position },
        )
      }
    }
    const profiles = this.profilers.map((p) => p.profile())
    const codes = this.profilers.map((p) => p.columnCodes())
    const suggestion = suggestNesting(
      this.dataRows,
      profiles.map((profile, k) => ({
        name: profile.name,
        type: profile.type,
        distinctCount: profile.distinctCount,
        missingCount: profile.missingCount,
        // Only text and integer columns can group rows; converting the others would only cost memory.
        coded:
          codes[k] && (profile.type === 'text' || profile.type === 'integer')
            ? { name: profile.name, codes: codes[k].codes, labels: codes[k].labels }
            : null,
      })),
    )
    return {
      headerRow: this.headerRow,
      columnNames: this.columnNames,
      rowCount: this.dataRows,
      profiles,
      codes,
      suggestion,
    }
  }
}
