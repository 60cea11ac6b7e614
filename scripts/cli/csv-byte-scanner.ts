/**
 * Splits UTF-8 CSV/TSV bytes into records and reports where each field starts and ends, without
 * turning fields into strings. The command line's reader then makes a string only when a label
 * changes from one row to the next and parses numbers straight from the bytes, which is what lets it
 * read a million-row table in a fraction of a second (papaparse made a string of every field and
 * took about three times as long on the benchmark file; the differential test beside this file
 * compares the two on awkward input).
 *
 * Handles RFC 4180 quoting ("" inside quotes), LF, CRLF and lone-CR line ends, and records that
 * straddle the chunks they arrive in (only the unfinished record is carried over).
 */
import { CliInputError } from './cli-input-error'

const QUOTE = 34
const LF = 10
const CR = 13

export interface CsvRecord {
  /** The bytes the offsets point into; valid only during the callback. */
  bytes: Buffer
  /** Field boundaries; for a quoted field, the text between the quotes. */
  starts: Int32Array
  ends: Int32Array
  /** 1 when the field was quoted and holds a doubled quote that still needs unescaping. */
  escaped: Uint8Array
  count: number
  /** 1-based line of the file on which the record starts. */
  line: number
}

/** A quoted field's text, with its doubled quotes undone. */
export function fieldText(record: CsvRecord, field: number): string {
  const text = record.bytes.toString('utf8', record.starts[field], record.ends[field])
  return record.escaped[field] ? text.replaceAll('""', '"') : text
}

export class CsvByteScanner {
  private buffer = Buffer.alloc(1 << 20)
  private length = 0
  private line = 1
  private readonly record: CsvRecord

  constructor(
    private readonly delimiter: number,
    private readonly onRecord: (record: CsvRecord) => void,
  ) {
    this.record = {
      bytes: this.buffer,
      starts: new Int32Array(64),
      ends: new Int32Array(64),
      escaped: new Uint8Array(64),
      count: 0,
      line: 1,
    }
  }

  push(chunk: Uint8Array): void {
    this.append(chunk)
    const consumed = this.scan(false)
    this.buffer.copy(this.buffer, 0, consumed, this.length)
    this.length -= consumed
  }

  /** Finishes the last record (a file need not end with a line break). */
  end(): void {
    this.scan(true)
    this.length = 0
  }

  private append(chunk: Uint8Array): void {
    const needed = this.length + chunk.length
    if (needed > this.buffer.length) {
      const bigger = Buffer.alloc(Math.max(needed, 2 * this.buffer.length))
      this.buffer.copy(bigger, 0, 0, this.length)
      this.buffer = bigger
      this.record.bytes = bigger
    }
    this.buffer.set(chunk, this.length)
    this.length = needed
  }

  /** Emits every complete record; returns where the unfinished one starts. */
  private scan(final: boolean): number {
    let position = 0
    while (position < this.length) {
      const next = this.scanRecord(position, final)
      if (next < 0) break
      position = next
    }
    return position
  }

  private addField(start: number, end: number, escaped: number): void {
    const record = this.record
    if (record.count === record.starts.length) {
      const size = 2 * record.count
      const grow = <T extends Int32Array | Uint8Array>(from: T, to: T) => (to.set(from), to)
      record.starts = grow(record.starts, new Int32Array(size))
      record.ends = grow(record.ends, new Int32Array(size))
      record.escaped = grow(record.escaped, new Uint8Array(size))
    }
    record.starts[record.count] = start
    record.ends[record.count] = end
    record.escaped[record.count] = escaped
    record.count++
  }

  /** Scans the record starting at `start`; returns the position after it, or -1 when it is unfinished. */
  private scanRecord(start: number, final: boolean): number {
    const bytes = this.buffer
    const length = this.length
    const delimiter = this.delimiter
    this.record.count = 0
    let linesInside = 0
    let i = start
    for (;;) {
      if (i < length && bytes[i] === QUOTE) {
        let j = i + 1
        let escaped = 0
        let close: number
        for (;;) {
          close = bytes.indexOf(QUOTE, j)
          if (close < 0 || close >= length) {
            if (!final) return -1
            throw new CliInputError(`Line ${this.line}: a quoted field is never closed.`)
          }
          if (close + 1 >= length && !final) return -1
          if (bytes[close + 1] !== QUOTE || close + 1 >= length) break
          escaped = 1
          j = close + 2
        }
        for (let k = i + 1; k < close; k++) if (bytes[k] === LF) linesInside++
        this.addField(i + 1, close, escaped)
        i = close + 1
        if (i >= length) return this.emit(linesInside, length)
        const after = bytes[i]
        if (after === delimiter) {
          i++
          continue
        }
        if (after !== LF && after !== CR)
          throw new CliInputError(
            `Line ${this.line + linesInside}: text follows the closing quote of field ${this.record.count}.`,
          )
      } else {
        let j = i
        while (j < length) {
          const c = bytes[j]
          if (c === delimiter || c === LF || c === CR) break
          j++
        }
        this.addField(i, j, 0)
        if (j >= length) return final ? this.emit(linesInside, length) : -1
        i = j
        if (bytes[i] === delimiter) {
          i++
          continue
        }
      }
      // bytes[i] ends the line: LF, CRLF or a lone CR.
      if (bytes[i] === CR) {
        if (i + 1 >= length && !final) return -1
        return this.emit(linesInside, bytes[i + 1] === LF && i + 1 < length ? i + 2 : i + 1)
      }
      return this.emit(linesInside, i + 1)
    }
  }

  private emit(linesInside: number, next: number): number {
    this.record.line = this.line
    this.onRecord(this.record)
    this.line += 1 + linesInside
    return next
  }
}
