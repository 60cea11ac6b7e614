import type { ColumnProfile, ColumnType } from '../../shared/schemas/datasets'
import { ByteKeyTable } from './byte-key-table'
import { NumberShape, numberShapeOfBytes, type DecimalMark } from '../rows-store/number-text'
import { parseDecimalBytes } from './parse-decimal-bytes'

/** Code stored for a missing cell in the per-row codes (as the nesting functions expect). */
export const MISSING_CODE = -1

export interface ProfilerOptions {
  decimalMark: DecimalMark
  naValues: ReadonlySet<string>
  /** The same values as UTF-8 bytes, to recognise a missing cell without making a string of it. */
  naBytes: readonly Buffer[]
  /** Most distinct values tracked per column. */
  distinctCap: number
}

/** Per-row label codes of a low-cardinality column, kept for the nesting suggestion. */
export interface ColumnCodes {
  codes: Int32Array
  labels: string[]
}

/** Codes the lookup returns besides a label code. */
const NA_CODE = -1
const UNCODED = -2

const SAMPLE_SIZE = 5

/**
 * Most distinct values tracked in a column once it holds decimals. Such a column never groups rows
 * (it keeps no per-row codes), and measurements with several decimals are nearly all distinct: a
 * table of 65,000 values cost more than reading the rest of the file (cache misses on every cell),
 * while beyond a few thousand values the count only says "many".
 */
const DECIMAL_DISTINCT_CAP = 4096

const isSpaceByte = (b: number) => b === 32 || b === 9 || b === 10 || b === 13
// U+00A0, the no-break space, in UTF-8.
const NBSP_LEAD = 0xc2
const NBSP_TAIL = 0xa0

/** Reused by add() for the bytes of one spreadsheet cell. */
let scratch = Buffer.allocUnsafe(1024)
const TOP_VALUES = 20

/**
 * Profiles one column in a single pass: type, missing count, distinct values (up to a cap), numeric
 * range, mean and SD, and per-row codes for the nesting suggestion. Each distinct value is classified
 * once, so low-cardinality columns (labs, animals, conditions) cost one map lookup per row.
 */
export class ColumnProfiler {
  private rows = 0
  private missing = 0
  private maybeNumeric = true
  private allInteger = true
  private sawValue = false
  /** Trimmed cell bytes → label code (or NA_CODE); null once the column passed the distinct cap. */
  private distinct: ByteKeyTable | null = new ByteKeyTable()
  private labels: string[] = []
  private valueOfCode: Float64Array | null = new Float64Array(256)
  private counts: Uint32Array | null = new Uint32Array(256)
  // Int32 (not 16-bit) so the nesting suggestion uses them as they are, without a converted copy.
  private codes: Int32Array | null = new Int32Array(1024)
  private numericCount = 0
  private mean = 0
  private m2 = 0
  private min = Infinity
  private max = -Infinity
  private samples: string[] = []
  /** Entry of the previous cell's value in `distinct`, or -1. */
  private lastEntry = -1
  /** First cell written as a number too large for a double (row index, text). */
  overflow: { rowIndex: number; text: string } | null = null

  constructor(
    readonly position: number,
    readonly name: string,
    private readonly options: ProfilerOptions,
  ) {}

  /** One cell given as text (spreadsheets); null is an empty cell. Profiled exactly as addBytes would. */
  add(raw: string | null): void {
    const text = raw ?? ''
    if (scratch.length < 3 * text.length) scratch = Buffer.allocUnsafe(3 * text.length)
    this.addBytes(scratch, 0, scratch.write(text, 0, 'utf8'))
  }

  /** One cell as UTF-8 bytes `bytes[start, end)`, trimmed here as trimCell trims text. */
  addBytes(bytes: Buffer, start: number, end: number): void {
    for (;;) {
      if (start < end && isSpaceByte(bytes[start])) start++
      else if (end - start >= 2 && bytes[start] === NBSP_LEAD && bytes[start + 1] === NBSP_TAIL) start += 2
      else break
    }
    for (;;) {
      if (end > start && isSpaceByte(bytes[end - 1])) end--
      else if (end - start >= 2 && bytes[end - 1] === NBSP_TAIL && bytes[end - 2] === NBSP_LEAD) end -= 2
      else break
    }
    const rowIndex = this.rows++
    // Grouping columns repeat the same value for many rows in a row: compare with the last one first.
    const last = this.lastEntry
    const code =
      last >= 0 && this.distinct!.equals(last, bytes, start, end)
        ? this.distinct!.value(last)
        : this.lookup(bytes, start, end, rowIndex)
    if (code === NA_CODE) {
      this.missing++
      this.setCode(rowIndex, MISSING_CODE)
      return
    }
    this.sawValue = true
    let value: number
    if (code >= 0) {
      this.setCode(rowIndex, code)
      this.counts![code]++
      if (!this.maybeNumeric) return
      value = this.valueOfCode![code]
    } else {
      if (!this.maybeNumeric) return
      value = this.classify(bytes, start, end, rowIndex)
    }
    if (!this.maybeNumeric || !Number.isFinite(value)) return
    // Welford's running mean and sum of squares: stable for a million values.
    this.numericCount++
    const delta = value - this.mean
    this.mean += delta / this.numericCount
    this.m2 += delta * (value - this.mean)
    if (value < this.min) this.min = value
    if (value > this.max) this.max = value
  }

  /** NA_CODE for a missing value, the value's code, or UNCODED once the column has too many distinct values. */
  private lookup(bytes: Buffer, start: number, end: number, rowIndex: number): number {
    this.lastEntry = -1
    const distinct = this.distinct
    if (!distinct) return this.isMissing(bytes, start, end) ? NA_CODE : UNCODED
    const hash = ByteKeyTable.hash(bytes, start, end)
    const known = distinct.find(bytes, start, end, hash)
    if (known >= 0) {
      this.lastEntry = known
      return distinct.value(known)
    }
    const text = bytes.toString('utf8', start, end)
    const code = this.options.naValues.has(text)
      ? NA_CODE
      : this.addDistinct(text, this.maybeNumeric ? this.classify(bytes, start, end, rowIndex) : NaN)
    if (code === undefined) return UNCODED
    this.lastEntry = distinct.insert(bytes, start, end, hash, code)
    return code
  }

  private isMissing(bytes: Buffer, start: number, end: number): boolean {
    const length = end - start
    for (const na of this.options.naBytes) {
      if (na.length === length && na.equals(bytes.subarray(start, end))) return true
    }
    return false
  }

  /** Registers a new distinct value and its number; returns its code, or undefined when the cap was just passed. */
  private addDistinct(text: string, value: number): number | undefined {
    const cap = this.allInteger
      ? this.options.distinctCap
      : Math.min(this.options.distinctCap, DECIMAL_DISTINCT_CAP)
    if (this.labels.length >= cap) {
      this.distinct = null
      this.codes = null
      this.counts = null
      this.valueOfCode = null
      return undefined
    }
    const code = this.labels.length
    this.labels.push(text)
    if (this.samples.length < SAMPLE_SIZE) this.samples.push(text)
    if (code >= this.valueOfCode!.length) {
      this.valueOfCode = grow(this.valueOfCode!, code + 1) as Float64Array
      this.counts = grow(this.counts!, code + 1) as Uint32Array
    }
    this.valueOfCode![code] = this.maybeNumeric ? value : NaN
    return code
  }

  /**
   * Numeric value of a trimmed cell, or NaN after marking the column as text. Read from the bytes
   * (exactly as Number() reads the text, see parseDecimalBytes); only unusual numbers make a string.
   */
  private classify(bytes: Buffer, start: number, end: number, rowIndex: number): number {
    const { decimalMark } = this.options
    const shape = numberShapeOfBytes(bytes, start, end, decimalMark)
    if (shape === NumberShape.None) {
      this.maybeNumeric = false
      return NaN
    }
    let value = parseDecimalBytes(bytes, start, end, decimalMark === ',')
    if (Number.isNaN(value)) value = Number(bytes.toString('latin1', start, end).replace(',', '.'))
    if (shape === NumberShape.Integer) return value
    // Measurements with decimals never group rows into units: their per-row codes are not needed.
    this.allInteger = false
    this.codes = null
    if (!Number.isFinite(value) && this.overflow === null)
      this.overflow = { rowIndex, text: bytes.toString('latin1', start, end) }
    return value
  }

  /** Makes room for `rows` codes at once, sparing repeated growth on large files. */
  reserve(rows: number): void {
    if (this.codes && this.codes.length < rows) {
      const bigger = new Int32Array(rows)
      bigger.set(this.codes)
      this.codes = bigger
    }
  }

  private setCode(rowIndex: number, code: number): void {
    const codes = this.codes
    if (!codes) return
    if (rowIndex >= codes.length) this.codes = grow(codes, rowIndex + 1) as Int32Array
    this.codes![rowIndex] = code
  }

  get type(): ColumnType {
    if (!this.sawValue) return 'empty'
    if (!this.maybeNumeric) return 'text'
    return this.allInteger ? 'integer' : 'numeric'
  }

  /** Codes for every row, or null when the column has more distinct values than the cap. */
  columnCodes(): ColumnCodes | null {
    if (!this.codes) return null
    return { codes: this.codes.subarray(0, this.rows), labels: this.labels }
  }

  profile(): ColumnProfile {
    const numeric = this.type === 'integer' || this.type === 'numeric'
    const hasNumbers = numeric && this.numericCount > 0
    let topValues: ColumnProfile['topValues'] = null
    if (this.counts) {
      const order = this.labels
        .map((_, code) => code)
        .sort((a, b) => this.counts![b] - this.counts![a] || a - b)
      topValues = order
        .slice(0, TOP_VALUES)
        .map((code) => ({ value: this.labels[code], count: this.counts![code] }))
    }
    return {
      position: this.position,
      name: this.name,
      type: this.type,
      missingCount: this.missing,
      // Once capped, the labels seen before the cap stay counted: "at least" that many.
      distinctCount: this.labels.length,
      distinctCapped: this.distinct === null,
      min: hasNumbers ? this.min : null,
      max: hasNumbers ? this.max : null,
      mean: hasNumbers ? this.mean : null,
      sd: hasNumbers && this.numericCount > 1 ? Math.sqrt(this.m2 / (this.numericCount - 1)) : null,
      sampleValues: this.samples,
      topValues,
    }
  }
}

/** Grows by half: a million-row file wastes less memory than with doubling. */
function grow<T extends Int32Array | Uint32Array | Float64Array>(array: T, atLeast: number): T {
  let size = Math.ceil(array.length * 1.5)
  while (size < atLeast) size = Math.ceil(size * 1.5)
  const bigger = new (array.constructor as new (n: number) => T)(size)
  bigger.set(array)
  return bigger
}
