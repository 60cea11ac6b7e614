import type { Factor, NestedColumns } from '../../shared/stats/types'
import { CliInputError } from './cli-input-error'

export interface ColumnSelection {
  response: string
  /** Nesting levels, outermost first. */
  levels: string[]
  condition?: string | null
  /** Decimal mark of the response values. */
  decimal?: '.' | ','
}

/** Spreadsheet spellings of "no value": such a response leaves its row out (counted by the engine). */
const MISSING_TOKENS = new Set(['', 'NA', 'N/A', 'NaN', 'nan', 'na', 'n/a', '.', '-', 'NULL', 'null'])

/** Trims surrounding white space, without allocating when there is none (the usual case). */
function clean(field: string | undefined): string {
  if (field === undefined || field.length === 0) return ''
  const first = field.charCodeAt(0)
  const last = field.charCodeAt(field.length - 1)
  return first <= 32 || last <= 32 || first === 0xa0 || last === 0xa0 ? field.trim() : field
}

function isBlank(fields: string[]): boolean {
  return fields.every((field) => field.trim() === '')
}

/** A factor under construction: codes grow by doubling, labels get codes in order of appearance. */
class FactorBuilder {
  readonly codeOf = new Map<string, number>()
  readonly labels: string[] = []
  codes: Int32Array
  // Tables are usually sorted by unit, so most rows repeat the previous row's label.
  private lastLabel = ''
  private lastCode = -1

  constructor(
    readonly name: string,
    capacity: number,
  ) {
    this.codes = new Int32Array(capacity)
  }

  /** Code of a (trimmed, non-empty) label, adding it on first sight. */
  code(label: string): number {
    if (label === this.lastLabel && this.lastCode >= 0) return this.lastCode
    let code = this.codeOf.get(label)
    if (code === undefined) {
      code = this.labels.length
      this.labels.push(label)
      this.codeOf.set(label, code)
    }
    this.lastLabel = label
    this.lastCode = code
    return code
  }

  toFactor(length: number): Factor {
    // A view, not a copy: the spare capacity is small when the reader reserved well.
    return { name: this.name, codes: this.codes.subarray(0, length), labels: this.labels }
  }
}

/**
 * Turns parsed rows (arrays of strings, first one the header) into engine columns without keeping
 * any per-row object: labels become integer codes through Map lookups, the response goes straight
 * into a Float64Array. A row with a missing label or a missing response gets NaN as its response
 * so the engine leaves it out and counts it.
 */
export class ColumnCollector {
  private responseIndex = -1
  private levelIndices: number[] = []
  private conditionIndex = -1
  private levels: FactorBuilder[] = []
  private condition: FactorBuilder | null = null
  /** Levels then condition, with their column indices: the per-row loop treats them alike. */
  private factors: FactorBuilder[] = []
  private factorIndices: number[] = []
  private response = new Float64Array(1024)
  private rows = 0
  private headerSeen = false
  private readonly decimalComma: boolean

  constructor(private readonly selection: ColumnSelection) {
    this.decimalComma = selection.decimal === ','
    const names = [
      selection.response,
      ...selection.levels,
      ...(selection.condition ? [selection.condition] : []),
    ]
    const repeated = names.find((name, i) => names.indexOf(name) !== i)
    if (repeated !== undefined)
      throw new CliInputError(
        `The column "${repeated}" is used twice; response, levels and condition must be different columns.`,
      )
  }

  get rowCount(): number {
    return this.rows
  }

  /** Feeds one parsed row; the first row fed is the header. */
  add(fields: string[]): void {
    this.addRows([fields])
  }

  /** Feeds parsed rows in order (a papaparse chunk); the first row ever fed is the header. */
  addRows(rows: string[][]): void {
    let first = 0
    if (!this.headerSeen && rows.length > 0) {
      this.readHeader(rows[0])
      first = 1
    }
    const factors = this.factors
    const indices = this.factorIndices
    const nFactors = factors.length
    for (let r = first; r < rows.length; r++) {
      const fields = rows[r]
      if (this.rows === this.response.length) this.grow()
      const row = this.rows
      let missing = false
      for (let f = 0; f < nFactors; f++) {
        const label = clean(fields[indices[f]])
        if (label === '') {
          // A row with a missing label still needs a code; it is left out through its NaN response.
          missing = true
          factors[f].codes[row] = 0
        } else {
          factors[f].codes[row] = factors[f].code(label)
        }
      }
      // A row of separators only (spreadsheet leftovers) is not data: forget it instead of counting it.
      if (missing && isBlank(fields)) continue
      this.rows++
      this.response[row] = missing ? NaN : this.parseResponse(fields[this.responseIndex], row)
    }
  }

  finish(): NestedColumns {
    if (!this.headerSeen) throw new CliInputError('The file is empty: no header row.')
    if (this.rows === 0) throw new CliInputError('The file has a header but no data rows.')
    return {
      responseName: this.selection.response,
      response: this.response.subarray(0, this.rows),
      levels: this.levels.map((level) => level.toFactor(this.rows)),
      condition: this.condition ? this.condition.toFactor(this.rows) : null,
    }
  }

  private readHeader(fields: string[]): void {
    const header = fields.map((field, i) => (i === 0 ? field.replace(/^\uFEFF/, '') : field).trim())
    const find = (name: string): number => {
      const index = header.indexOf(name)
      if (index < 0) {
        const available = header.filter((h) => h !== '').join(', ')
        throw new CliInputError(`Column "${name}" not found. Available columns: ${available || '(none)'}.`)
      }
      if (header.indexOf(name, index + 1) >= 0)
        throw new CliInputError(`Column "${name}" appears more than once in the header; rename one of them.`)
      return index
    }
    this.responseIndex = find(this.selection.response)
    this.levelIndices = this.selection.levels.map(find)
    this.levels = this.selection.levels.map((name) => new FactorBuilder(name, this.response.length))
    if (this.selection.condition) {
      this.conditionIndex = find(this.selection.condition)
      this.condition = new FactorBuilder(this.selection.condition, this.response.length)
    }
    this.factors = this.condition ? [...this.levels, this.condition] : [...this.levels]
    this.factorIndices = this.condition ? [...this.levelIndices, this.conditionIndex] : [...this.levelIndices]
    this.headerSeen = true
  }

  private parseResponse(raw: string | undefined, row: number): number {
    const text = clean(raw)
    if (text === '') return NaN
    const value = Number(this.decimalComma ? text.replace(',', '.') : text)
    if (!Number.isFinite(value)) {
      if (MISSING_TOKENS.has(text)) return NaN
      // Data row r sits on file line r + 2 when no field spans lines (header is line 1).
      const hint =
        !this.decimalComma && /^-?\d+,\d+$/.test(text) ? ' (for a decimal comma use --decimal ",")' : ''
      throw new CliInputError(
        `Row ${row + 1} (line ${row + 2}): the response column "${this.selection.response}" holds "${text}", which is not a number${hint}.`,
      )
    }
    return value
  }

  /** Makes room for about `rows` data rows at once, so a large file is not copied while it grows. */
  reserve(rows: number): void {
    if (rows > this.response.length) this.resize(Math.ceil(rows))
  }

  private grow(): void {
    this.resize(this.response.length * 2)
  }

  private resize(size: number): void {
    const response = new Float64Array(size)
    response.set(this.response)
    this.response = response
    for (const factor of this.factors) {
      const codes = new Int32Array(size)
      codes.set(factor.codes)
      factor.codes = codes
    }
  }
}
