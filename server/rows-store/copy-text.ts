/**
 * PostgreSQL's COPY text format, both ways: rows we parsed ourselves go in this way (XLSX, and CSV
 * files PostgreSQL's CSV reader would misread), and the engine's read-back comes out this way.
 * Format: fields split by tab, rows by newline, \N for NULL, backslash escapes for \ tab LF CR.
 * https://www.postgresql.org/docs/current/sql-copy.html#id-1.9.3.55.9.2
 */

const NEEDS_ESCAPE = /[\\\t\n\r]/
const ESCAPES: Record<string, string> = { '\\': '\\\\', '\t': '\\t', '\n': '\\n', '\r': '\\r' }

/** One row as a COPY text line. Empty cells become NULL, as PostgreSQL's CSV reader stores them. */
export function encodeCopyTextRow(values: readonly (string | null)[]): string {
  let line = ''
  for (let k = 0; k < values.length; k++) {
    const value = values[k]
    if (k > 0) line += '\t'
    if (value === null || value === '') line += '\\N'
    else line += NEEDS_ESCAPE.test(value) ? value.replace(/[\\\t\n\r]/g, (c) => ESCAPES[c]) : value
  }
  return line + '\n'
}

const TAB = 9
const LF = 10
const CR = 13
const BACKSLASH = 92
const NUL = 0
const NULL_MARK = [BACKSLASH, 78] // \N

/** A row as byte ranges (the CSV reader's rows have this shape). */
export interface ByteRow {
  bytes: Buffer
  starts: ArrayLike<number>
  ends: ArrayLike<number>
  count: number
}

/**
 * Builds COPY text lines from the CSV reader's byte rows, as encodeCopyTextRow does from strings,
 * without making a string of any field on the way.
 */
export class CopyTextBuilder {
  private out = Buffer.allocUnsafe(256 * 1024)
  private used = 0

  /** Appends one row; returns the index of a field holding a NUL byte (COPY cannot store it), or -1. */
  addRow(row: ByteRow): number {
    const { bytes, starts, ends, count } = row
    let size = count + 2
    for (let k = 0; k < count; k++) size += 2 * (ends[k] - starts[k])
    this.reserve(size)
    const out = this.out
    let at = this.used
    for (let k = 0; k < count; k++) {
      if (k > 0) out[at++] = TAB
      if (ends[k] === starts[k]) {
        out[at++] = NULL_MARK[0]
        out[at++] = NULL_MARK[1]
        continue
      }
      for (let i = starts[k]; i < ends[k]; i++) {
        const b = bytes[i]
        if (b === NUL) return k
        if (b === BACKSLASH || b === TAB || b === LF || b === CR) {
          out[at++] = BACKSLASH
          out[at++] = b === BACKSLASH ? BACKSLASH : b === TAB ? 116 : b === LF ? 110 : 114 // t n r
        } else out[at++] = b
      }
    }
    out[at++] = LF
    this.used = at
    return -1
  }

  /** The lines built so far (a copy), leaving the builder empty. */
  take(): Buffer {
    const lines = Buffer.from(this.out.subarray(0, this.used))
    this.used = 0
    return lines
  }

  get length(): number {
    return this.used
  }

  private reserve(size: number): void {
    if (this.used + size <= this.out.length) return
    const bigger = Buffer.allocUnsafe(Math.max(2 * this.out.length, this.used + size))
    this.out.copy(bigger, 0, 0, this.used)
    this.out = bigger
  }
}

const UNESCAPES: Record<string, string> = { b: '\b', f: '\f', n: '\n', r: '\r', t: '\t', v: '\v', '\\': '\\' }

/** Undoes the backslash escapes PostgreSQL writes (it never writes octal or hex escapes for UTF-8 text). */
export function decodeCopyTextField(field: string): string | null {
  if (field === '\\N') return null
  if (field.indexOf('\\') === -1) return field
  return field.replace(/\\(.)/g, (_, c: string) => UNESCAPES[c] ?? c)
}

/**
 * Splits COPY text output arriving in chunks into lines without allocating per-row arrays:
 * `onLine(text, start, end)` gets the decoded chunk text and the bounds of one line (no newline);
 * callers walk its tab-separated fields with nextTab(). A million-row read-back stays fast.
 */
export class CopyTextLines {
  private carry = ''
  private readonly decoder = new TextDecoder('utf-8')

  constructor(private readonly onLine: (text: string, start: number, end: number) => void) {}

  push(chunk: Uint8Array): void {
    const text = this.carry + this.decoder.decode(chunk, { stream: true })
    let start = 0
    for (;;) {
      const end = text.indexOf('\n', start)
      if (end === -1) break
      this.onLine(text, start, end)
      start = end + 1
    }
    this.carry = text.slice(start)
  }

  end(): void {
    const rest = this.carry + this.decoder.decode()
    if (rest.length) this.onLine(rest, 0, rest.length)
    this.carry = ''
  }
}

/** End of the field starting at `from`: the next tab, or `lineEnd` for the last field of the line. */
export function fieldEnd(text: string, from: number, lineEnd: number): number {
  const tab = text.indexOf('\t', from)
  return tab === -1 || tab > lineEnd ? lineEnd : tab
}
