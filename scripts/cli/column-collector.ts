import { readBinaryResponse } from '../../shared/analysis/binary-response'
import type { Factor, NestedColumns } from '../../shared/stats/types'
import { CliInputError } from './cli-input-error'

export interface ColumnSelection {
  response: string
  /**
   * The response's distribution (default gaussian). A binomial response without trials is read
   * as values (two labels, or 0 and 1) and turned into 0/1; a poisson response must hold whole
   * numbers of at least 0.
   */
  family?: 'gaussian' | 'binomial' | 'poisson'
  /** Binomial only: the column of trials per row (the response then holds successes). */
  trials?: string
  /** Binomial without trials: the value counted as yes (default: see defaultPositiveLabel). */
  positive?: string
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

/** The engine's columns, and for a yes/no response read from two values, which one was yes. */
export type CollectedColumns = NestedColumns & { outcome?: { positive: string; negative: string | null } }

/** Number of distinct response values a yes/no response may hold ("1" and "1.0" are one). */
const BINARY_VALUES = 2

/**
 * Turns table rows into engine columns without keeping any per-row object: labels become integer
 * codes through Map lookups, the response and covariates go straight into Float64Arrays. A row
 * with a missing label, response or covariate gets NaN there, so the engine leaves it out and
 * counts it. The reader looks up label codes only when a label changes from one row to the next.
 * A binomial response without trials is collected as labels (at most two values); the values a
 * family cannot take are refused as they are read, naming the row and the line.
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
  /** Binomial without trials: the response's labels, and the distinct values seen (by number or text). */
  private responseLabels: FactorBuilder | null = null
  private responseValueKeys = new Map<string, string>()
  /** Column index of the trials column (binomial with trials), and its values. */
  trialsColumn = -1
  private trials: Float64Array | null = null
  private rows = 0
  private headerSeen = false
  readonly decimalComma: boolean

  constructor(private readonly selection: ColumnSelection) {
    this.decimalComma = selection.decimal === ','
    const names = [
      selection.response,
      ...(selection.trials ? [selection.trials] : []),
      ...selection.levels,
      ...(selection.conditions ?? []),
      ...(selection.covariates ?? []),
    ]
    const repeated = names.find((name, i) => names.indexOf(name) !== i)
    if (repeated !== undefined)
      throw new CliInputError(
        `The column "${repeated}" is used twice; response, ${selection.trials ? 'trials, ' : ''}levels, conditions and covariates must be different columns.`,
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

  /** True when the response is read as values (a binomial response without trials), not numbers. */
  get responseAsLabels(): boolean {
    return this.responseLabels !== null
  }

  /**
   * Code of a yes/no response's value (−1 when missing); a third distinct value stops the reading,
   * naming the row and line. "1" and "1.0" are one value.
   */
  responseLabelCode(raw: string, row: number, line: number): number {
    const label = clean(raw)
    if (label === '' || MISSING_TOKENS.has(label)) return -1
    const builder = this.responseLabels!
    const known = builder.codeOf.get(label)
    if (known !== undefined) return known
    const number = Number(this.decimalComma ? label.replace(',', '.') : label)
    const key = Number.isFinite(number) ? `#${number}` : `"${label}`
    if (!this.responseValueKeys.has(key)) {
      if (this.responseValueKeys.size >= BINARY_VALUES) {
        const [a, b] = [...this.responseValueKeys.values()]
        throw new CliInputError(
          `Row ${row + 1} (line ${line}): the response column "${this.selection.response}" holds "${label}", a third value besides "${a}" and "${b}"; a --family binomial response holds two values (or 0 and 1).`,
        )
      }
      this.responseValueKeys.set(key, label)
    }
    return builder.code(label)
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
  addRow(
    codes: Int32Array,
    response: number,
    covariates?: Float64Array,
    extra: { trials?: number; responseCode?: number; line?: number } = {},
  ): void {
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
    if (this.responseLabels) this.responseLabels.codes[row] = missing ? -1 : (extra.responseCode ?? -1)
    if (this.trials) this.trials[row] = extra.trials ?? NaN
    if (!missing) this.checkRow(row, response, extra.trials ?? NaN, extra.line ?? row + 2)
  }

  /** Counts must be whole numbers of at least 0, trials of at least 1, successes no more than the trials. */
  private checkRow(row: number, response: number, trials: number, line: number): void {
    const family = this.selection.family
    const at = `Row ${row + 1} (line ${line})`
    const whole = (v: number, least: number) => Number.isInteger(v) && v >= least
    if (family === 'poisson' && response === response && !whole(response, 0))
      throw new CliInputError(
        `${at}: the response column "${this.selection.response}" holds ${response}; a --family poisson response must be a whole number of at least 0.`,
      )
    if (family !== 'binomial' || !this.trials) return
    if (trials === trials && !whole(trials, 1))
      throw new CliInputError(
        `${at}: the trials column "${this.selection.trials}" holds ${trials}; trials must be whole numbers of at least 1.`,
      )
    if (response === response && !whole(response, 0))
      throw new CliInputError(
        `${at}: the response column "${this.selection.response}" holds ${response}; successes must be whole numbers of at least 0.`,
      )
    if (response > trials)
      throw new CliInputError(
        `${at}: ${response} successes in "${this.selection.response}" but only ${trials} trials in "${this.selection.trials}"; successes cannot exceed the trials.`,
      )
  }

  finish(): CollectedColumns {
    if (!this.headerSeen) throw new CliInputError('The file is empty: no header row.')
    if (this.rows === 0) throw new CliInputError('The file has a header but no data rows.')
    const covariates = this.selection.covariates ?? []
    const family = this.selection.family ?? 'gaussian'
    const columns: CollectedColumns = {
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
      ...(family !== 'gaussian' ? { family } : {}),
    }
    if (this.trials) {
      columns.trials = this.trials.subarray(0, this.rows)
      columns.trialsName = this.selection.trials
    }
    if (this.responseLabels) {
      const { labels, codes } = this.responseLabels.toFactor(this.rows)
      const toNumber = (text: string) => Number(this.decimalComma ? text.replace(',', '.') : text)
      const read = readBinaryResponse(labels, codes, this.selection.positive ?? null, toNumber)
      if ('problem' in read) {
        if (read.problem.kind === 'unknown-positive')
          throw new CliInputError(
            `--positive "${read.problem.positive}" is not a value of "${this.selection.response}" (it has ${read.problem.values.map((v) => `"${v}"`).join(' and ')}).`,
          )
        throw new CliInputError(
          `The response column "${this.selection.response}" holds more than two values.`,
        )
      }
      // A row left out for a missing label stays left out.
      const response = read.values
      for (let r = 0; r < this.rows; r++) if (Number.isNaN(this.response[r])) response[r] = NaN
      columns.response = response
      columns.outcome = { positive: read.positive, negative: read.negative }
    }
    return columns
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
    const binomial = this.selection.family === 'binomial'
    if (binomial && this.selection.trials) {
      this.trialsColumn = find(this.selection.trials)
      this.trials = new Float64Array(size)
    } else if (binomial) this.responseLabels = new FactorBuilder(this.selection.response, size)
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

  /** The trials of a row (NaN when missing); names the row, line and column when it is not a number. */
  parseTrials(raw: string, row: number, line: number): number {
    return this.parseNumber(raw, row, line, `the trials column "${this.selection.trials}"`)
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
    if (this.trials) {
      const trials = new Float64Array(size)
      trials.set(this.trials)
      this.trials = trials
    }
    for (const factor of this.responseLabels ? [...this.factors, this.responseLabels] : this.factors) {
      const codes = new Int32Array(size)
      codes.set(factor.codes)
      factor.codes = codes
    }
  }
}
