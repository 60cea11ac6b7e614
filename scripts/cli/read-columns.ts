import { closeSync, openSync, readSync, statSync } from 'node:fs'
import { extname } from 'node:path'
import { CsvSyntaxError, CsvTokenizer, fieldText, type CsvRow } from '../../server/ingest/csv-tokenizer'
import { guessDelimiter } from '../../server/ingest/guess-delimiter'
import { CliInputError } from './cli-input-error'
import { ColumnCollector, type CollectedColumns, type ColumnSelection } from './column-collector'
import { parseDecimalBytes } from '../../server/ingest/parse-decimal-bytes'
import { AppError } from '../../server/errors/app-error'
import { sniffFile, SNIFF_BYTES, type TextSniff } from '../../server/ingest/sniff'
import { NotUtf8, toUtf8 } from '../../server/ingest/text-decoding'

export interface ReadColumnsOptions extends ColumnSelection {
  /** Field separator; undefined = detected from the first rows (comma, semicolon, tab or bar). */
  delimiter?: string
}

/** Bytes gathered before guessing the separator, and the lines of them the guess looks at. */
const GUESS_BYTES = 16 * 1024
const GUESS_LINES = 50
const READ_BYTES = 1 << 20

/** What the ingest's CSV reader found wrong, in the command line's words (it counts lines, not rows). */
function syntaxMessage(error: CsvSyntaxError): string {
  switch (error.kind) {
    case 'unterminated-quote':
      return `Line ${error.line}: a quoted field is never closed.`
    case 'text-after-quote':
      return `Line ${error.line}: text follows the closing quote of field ${error.fieldIndex + 1}.`
    default:
      return `Line ${error.line}: the row is too long to read.`
  }
}

/**
 * Feeds the CSV reader's rows into a column collector. Labels are decoded only when they differ
 * from the previous row's bytes in the same column (tables are usually sorted by unit), and responses
 * are parsed from the bytes unless they are unusual, so most rows make no string at all.
 */
class ColumnReader {
  private readonly collector: ColumnCollector
  private tokenizer: CsvTokenizer | null = null
  private pending: Buffer[] = []
  private pendingBytes = 0
  private previousBytes: Buffer[] = []
  private previousLength: number[] = []
  /** Label code of each factor in the current row (-1 = missing). */
  private codes = new Int32Array(0)
  /** Value of each covariate in the current row (NaN = missing). */
  private covariates = new Float64Array(0)

  constructor(
    private readonly options: ReadColumnsOptions,
    private readonly extension: string,
    /** Size of the whole input, when known: the first rows then tell how many rows to make room for. */
    private readonly totalBytes = 0,
  ) {
    this.collector = new ColumnCollector(options)
  }

  push(chunk: Buffer): void {
    if (this.tokenizer) return this.read(() => this.tokenizer!.push(chunk))
    this.pending.push(Buffer.from(chunk))
    this.pendingBytes += chunk.length
    if (this.pendingBytes >= GUESS_BYTES) this.startScanning()
  }

  finish(): CollectedColumns {
    if (!this.tokenizer) this.startScanning()
    this.read(() => this.tokenizer!.end())
    return this.collector.finish()
  }

  private read(step: () => void): void {
    try {
      step()
    } catch (error) {
      throw error instanceof CsvSyntaxError ? new CliInputError(syntaxMessage(error)) : error
    }
  }

  private startScanning(): void {
    const head = Buffer.concat(this.pending)
    const delimiter = this.options.delimiter ?? guessDelimiter(firstLines(head, GUESS_LINES), this.extension)
    // No length limits: the command line reads the user's own file, as long as it fits in memory.
    const tokenizer = new CsvTokenizer({
      delimiter,
      maxFieldChars: Number.MAX_SAFE_INTEGER,
      maxFieldsPerRow: Number.MAX_SAFE_INTEGER,
      onRow: (row) => this.onRecord(row),
    })
    this.tokenizer = tokenizer
    this.pending = []
    this.read(() => tokenizer.push(head))
    const rows = this.collector.rowCount
    if (rows > 0 && this.totalBytes > head.length)
      this.collector.reserve((1.05 * this.totalBytes * rows) / head.length)
  }

  private onRecord(record: CsvRow): void {
    // Empty lines are not rows.
    if (record.count === 1 && record.starts[0] === record.ends[0]) return
    const collector = this.collector
    if (!collector.hasHeader) {
      const header = Array.from({ length: record.count }, (_, field) => fieldText(record, field))
      collector.addHeader(header)
      this.previousBytes = collector.factorColumns.map(() => Buffer.alloc(64))
      this.previousLength = collector.factorColumns.map(() => -1)
      this.codes = new Int32Array(collector.factorColumns.length)
      this.covariates = new Float64Array(collector.covariateColumns.length)
      return
    }
    const columns = collector.factorColumns
    const codes = this.codes
    let missing = false
    for (let f = 0; f < columns.length; f++) {
      const field = columns[f]
      if (field >= record.count) {
        codes[f] = -1
        this.previousLength[f] = -1
      } else if (!this.sameLabel(record, f, field))
        codes[f] = collector.labelCode(f, fieldText(record, field))
      if (codes[f] < 0) missing = true
    }
    // A row of separators only (spreadsheet leftovers) is not data: forget it instead of counting it.
    if (missing && isBlank(record)) return
    const column = collector.responseColumn
    let response = NaN
    let responseCode = -1
    if (!missing && collector.responseAsLabels) {
      // A yes/no response is read as values; 0 stands in until they become 0/1 at the end.
      response = 0
      if (column < record.count)
        responseCode = collector.responseLabelCode(fieldText(record, column), collector.rowCount, record.line)
    } else if (!missing && column < record.count) {
      response = parseDecimalBytes(
        record.bytes,
        record.starts[column],
        record.ends[column],
        collector.decimalComma,
      )
      if (Number.isNaN(response))
        response = collector.parseResponse(fieldText(record, column), collector.rowCount, record.line)
    }
    const covariates = this.covariates
    if (covariates.length) this.readCovariates(record, missing)
    const trials = missing ? NaN : this.readTrials(record)
    collector.addRow(codes, response, covariates, { trials, responseCode, line: record.line })
  }

  /** The row's trials (binomial with trials), NaN when missing or when there is no trials column. */
  private readTrials(record: CsvRow): number {
    const collector = this.collector
    const field = collector.trialsColumn
    if (field < 0 || field >= record.count) return NaN
    const value = parseDecimalBytes(
      record.bytes,
      record.starts[field],
      record.ends[field],
      collector.decimalComma,
    )
    if (!Number.isNaN(value)) return value
    return collector.parseTrials(fieldText(record, field), collector.rowCount, record.line)
  }

  /** Each covariate of the row as a number (NaN when missing); a row left out for a missing label is not read. */
  private readCovariates(record: CsvRow, missing: boolean): void {
    const collector = this.collector
    const columns = collector.covariateColumns
    for (let k = 0; k < columns.length; k++) {
      const field = columns[k]
      if (missing || field >= record.count) {
        this.covariates[k] = NaN
        continue
      }
      let value = parseDecimalBytes(
        record.bytes,
        record.starts[field],
        record.ends[field],
        collector.decimalComma,
      )
      if (Number.isNaN(value))
        value = collector.parseCovariate(k, fieldText(record, field), collector.rowCount, record.line)
      this.covariates[k] = value
    }
  }

  /**
   * True when factor `f`'s field holds the same bytes as in the previous row (its code still holds);
   * otherwise remembers the new bytes.
   */
  private sameLabel(record: CsvRow, f: number, field: number): boolean {
    const start = record.starts[field]
    const length = record.ends[field] - start
    const bytes = record.bytes
    let previous = this.previousBytes[f]
    if (length === this.previousLength[f]) {
      let k = 0
      while (k < length && bytes[start + k] === previous[k]) k++
      if (k === length) return true
    }
    if (length > previous.length) previous = this.previousBytes[f] = Buffer.alloc(2 * length)
    bytes.copy(previous, 0, start, start + length)
    this.previousLength[f] = length
    return false
  }
}

/** The first `count` lines (fewer when the bytes end first): plenty for a guess, quick to score. */
function firstLines(bytes: Buffer, count: number): Buffer {
  let end = 0
  for (let line = 0; line < count; line++) {
    const next = bytes.indexOf(10, end)
    if (next < 0) return bytes
    end = next + 1
  }
  return bytes.subarray(0, end)
}

function isBlank(record: CsvRow): boolean {
  for (let field = 0; field < record.count; field++) if (fieldText(record, field).trim() !== '') return false
  return true
}

/** Reads a CSV/TSV text held in memory (small inputs, tests). */
export function readColumnsFromText(text: string, options: ReadColumnsOptions): CollectedColumns {
  const reader = new ColumnReader(options, '.csv')
  reader.push(Buffer.from(text.replace(/^\uFEFF/, ''), 'utf8'))
  return reader.finish()
}

function openFile(path: string): number {
  try {
    if (statSync(path).isDirectory())
      throw new CliInputError(`Cannot read "${path}": it is a folder, not a file.`)
    return openSync(path, 'r')
  } catch (error) {
    if (error instanceof CliInputError) throw error
    const code = (error as NodeJS.ErrnoException).code
    const reason =
      code === 'ENOENT' ? 'no such file' : code === 'EACCES' ? 'permission denied' : (error as Error).message
    throw new CliInputError(`Cannot read "${path}": ${reason}.`)
  }
}

/** What the web's ingest sniffs from the first bytes, in the command line's words when it refuses. */
function sniffText(fd: number, path: string, size: number): TextSniff {
  const head = Buffer.alloc(Math.min(SNIFF_BYTES, size))
  const n = readSync(fd, head, 0, head.length, 0)
  let sniff
  try {
    sniff = sniffFile(head.subarray(0, n), path, size)
  } catch (error) {
    if (error instanceof AppError) throw new CliInputError(error.message)
    throw error
  }
  if (sniff.fileType === 'xlsx')
    throw new CliInputError(
      `"${path}" is an Excel workbook; the command line reads text tables. Export the sheet as CSV (or upload the workbook in the app).`,
    )
  return sniff
}

/** Reads the file once, from just after its byte-order mark, turning it into UTF-8 as the web does. */
function readAs(fd: number, sniff: TextSniff, reader: ColumnReader): CollectedColumns {
  const utf8 = toUtf8(sniff.encoding)
  const chunk = Buffer.allocUnsafe(READ_BYTES)
  let position = sniff.bomBytes
  for (;;) {
    const n = readSync(fd, chunk, 0, READ_BYTES, position)
    if (n === 0) break
    position += n
    reader.push(utf8.write(chunk.subarray(0, n)))
  }
  reader.push(utf8.end())
  return reader.finish()
}

/**
 * Reads a CSV/TSV file into engine columns, decoded exactly as the web's upload decodes it
 * (server/ingest: sniffFile and toUtf8): UTF-8 with or without a byte-order mark, UTF-16, or a
 * legacy encoding such as Windows-1252, which spreadsheet programs write. The separator (comma,
 * semicolon, tab or bar) and the decimal mark are the sniffed ones unless given. Quoted fields,
 * CRLF or LF line ends. Memory stays proportional to the columns kept, not the file.
 */
export async function readColumnsFromFile(
  path: string,
  options: ReadColumnsOptions,
): Promise<CollectedColumns> {
  const fd = openFile(path)
  try {
    const size = statSync(path).size
    let sniff = sniffText(fd, path, size)
    const settle = (found: TextSniff): ReadColumnsOptions => ({
      ...options,
      delimiter: options.delimiter ?? found.delimiter,
      decimal: options.decimal ?? found.decimalMark,
    })
    try {
      return readAs(fd, sniff, new ColumnReader(settle(sniff), extname(path).toLowerCase(), size))
    } catch (error) {
      // UTF-8 in the sniffed bytes but not further on: read again as Windows-1252, as the web does.
      if (!(error instanceof NotUtf8) || sniff.encoding !== 'utf-8') throw error
      sniff = { ...sniff, encoding: 'windows-1252', bomBytes: 0 }
      return readAs(fd, sniff, new ColumnReader(settle(sniff), extname(path).toLowerCase(), size))
    }
  } finally {
    closeSync(fd)
  }
}
