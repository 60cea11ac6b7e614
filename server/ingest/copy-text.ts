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
 * Splits COPY text output arriving in chunks into rows. `onRow` gets the raw fields (still escaped):
 * callers decode only the fields they need, which keeps a million-row read-back fast.
 */
export class CopyTextReader {
  private carry = ''
  private readonly decoder = new TextDecoder('utf-8')

  constructor(private readonly onRow: (fields: string[]) => void) {}

  push(chunk: Uint8Array): void {
    const text = this.carry + this.decoder.decode(chunk, { stream: true })
    let start = 0
    for (;;) {
      const end = text.indexOf('\n', start)
      if (end === -1) break
      this.onRow(text.slice(start, end).split('\t'))
      start = end + 1
    }
    this.carry = text.slice(start)
  }

  end(): void {
    const rest = this.carry + this.decoder.decode()
    if (rest.length) this.onRow(rest.split('\t'))
    this.carry = ''
  }
}
