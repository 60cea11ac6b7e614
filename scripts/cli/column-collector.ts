import type { Factor, NestedColumns } from '../../shared/stats/types'
import { CliInputError } from './cli-input-error'

export interface ColumnSelection {
  response: string
  /** Nesting levels, outermost first. */
  levels: string[]
  /** Condition factors: none, one or two. */
  conditions?: readonly string[]
  /** Numeric covariates. */
  covariates?: readonly string[]
  /** Decimal mark of the response and covariate values. */
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

/** A factor under construction: codes grow by doubling, labels get codes in order of appearance. */
class FactorBuilder {
  readonly codeOf = new Map<string, number>()
  readonly labels: string[] = []
  codes: Int32Array

  constructor(
    readonly name: string,
    capacity: number,
  ) {
    this.codes = new Int32Array(capacity)
  }

  /** Code of a (trimmed, non-empty) label, adding it on first sight. */
  code(label: string): number {
    let code = this.codeOf.get(label)
    if (code === undefined) {
      code = this.labels.length
      this.labels.push(label)
      this.codeOf.set(label, code)
    }
    return code
  }

  toFactor(length: number): Factor {
    // A view, not a copy: the spare capacity is small when the reader reserved well.
    return { name: this.name, codes: this.codes.subarray(0, length), labels: this.labels }
  }
}

/**
 * Turns table rows into engine columns without keeping any per-row object: labels become integer
 * codes through Map lookups, the response and covariates go straight into Float64Arrays. A row
 * with a missing label, response or covariate gets NaN there, so the engine leaves it out and
 * counts it. The reader looks up label codes only when a label changes from one row to the next.
 */
export class ColumnCollector {
  private responseIndex = -1
  private levels: FactorBuilder[] = []
  private conditions: FactorBuilder[] = []
  private factors: FactorBuilder[] = []
  /** Column index of each factor: the levels, outermost first, then the conditions. */
  factorColumns: number[] = []
  /** Column index of each covariate, in the order given. */
  covariateColumns: number[] = []
  private response = new Float64Array(1024)
  private covariates: Float64Array[] = []
  private rows = 0
  private headerSeen = false
  readonly decimalComma: boolean

  constructor(private readonly selection: ColumnSelection) {
    this.decimalComma = selection.decimal === ','
    const names = [
      selection.response,
      ...selection.levels,
      ...(selection.conditions ?? []),
      ...(selection.covariates ?? []),
    ]
    const repeated = names.find((name, i) => names.indexOf(name) !== i)
    if (repeated !== undefined)
      throw new CliInputError(
        `The column "${repeated}" is used twice; response, levels, conditions and covariates must be different columns.`,
      )
  }

  get rowCount(): number {
    return this.rows
  }

  get hasHeader(): boolean {
    return this.headerSeen
  }

  get responseColumn(): number {
    return this.responseIndex
  }

  /** Code of factor `factor`'s label, or -1 when the label is missing. */
  labelCode(factor: number, raw: string): number {
    const label = clean(raw)
    return label === '' ? -1 : this.factors[factor].code(label)
  }

  /**
   * Adds a data row: one label code per factor, in factor order, and one value per covariate. A
   * row with a missing label (-1) still needs a code; it is left out through a NaN response.
   */
  addRow(codes: Int32Array, response: number, covariates?: Float64Array): void {
    if (this.rows === this.response.length) this.grow()
    const row = this.rows++
    const factors = this.factors
    let missing = false
    for (let f = 0; f < factors.length; f++) {
      const code = codes[f]
      if (code < 0) missing = true
      factors[f].codes[row] = code < 0 ? 0 : code
    }
    this.response[row] = missing ? NaN : response
    for (let k = 0; k < this.covariates.length; k++)
      this.covariates[k][row] = covariates ? covariates[k] : NaN
  }

  finish(): NestedColumns {
    if (!this.headerSeen) throw new CliInputError('The file is empty: no header row.')
    if (this.rows === 0) throw new CliInputError('The file has a header but no data rows.')
    const covariates = this.selection.covariates ?? []
    return {
      responseName: this.selection.response,
      response: this.response.subarray(0, this.rows),
      levels: this.levels.map((level) => level.toFactor(this.rows)),
      factors: this.conditions.map((condition) => condition.toFactor(this.rows)),
      ...(covariates.length
        ? {
            covariates: covariates.map((name, k) => ({
              name,
              values: this.covariates[k].subarray(0, this.rows),
            })),
          }
        : {}),
    }
  }

  /** Reads the header row and finds the selected columns in it. */
  addHeader(fields: string[]): void {
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
    const size = this.response.length
    const conditions = this.selection.conditions ?? []
    const covariates = this.selection.covariates ?? []
    this.levels = this.selection.levels.map((name) => new FactorBuilder(name, size))
    this.conditions = conditions.map((name) => new FactorBuilder(name, size))
    this.factors = [...this.levels, ...this.conditions]
    this.factorColumns = [...this.selection.levels, ...conditions].map(find)
    this.covariateColumns = covariates.map(find)
    this.covariates = covariates.map(() => new Float64Array(size))
    this.headerSeen = true
  }

  /** The response value of a field's text (NaN when missing); names the row and line when it is not a number. */
  parseResponse(raw: string, row: number, line: number): number {
    return this.parseNumber(raw, row, line, `the response column "${this.selection.response}"`)
  }

  /** Covariate `k`'s value of a field's text (NaN when missing); names the row, line and column when it is not a number. */
  parseCovariate(k: number, raw: string, row: number, line: number): number {
    return this.parseNumber(raw, row, line, `the covariate column "${this.selection.covariates![k]}"`)
  }

  private parseNumber(raw: string, row: number, line: number, what: string): number {
    const text = clean(raw)
    if (text === '') return NaN
    const value = Number(this.decimalComma ? text.replace(',', '.') : text)
    if (!Number.isFinite(value)) {
      if (MISSING_TOKENS.has(text)) return NaN
      const hint =
        !this.decimalComma && /^-?\d+,\d+$/.test(text) ? ' (for a decimal comma use --decimal ",")' : ''
      throw new CliInputError(
        `Row ${row + 1} (line ${line}): ${what} holds "${text}", which is not a number${hint}.`,
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
    this.covariates = this.covariates.map((values) => {
      const grown = new Float64Array(size)
      grown.set(values)
      return grown
    })
    for (const factor of this.factors) {
      const codes = new Int32Array(size)
      codes.set(factor.codes)
      factor.codes = codes
    }
  }
}
