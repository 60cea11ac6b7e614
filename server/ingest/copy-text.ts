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
