/**
 * An incremental CSV reader (RFC 4180 quoting) fed with decoded text chunks.
 *
 * Written by hand instead of using papaparse's stream mode because ingest runs it over every byte of
 * every upload: on a 1,000,000-row file it is about twice as fast, and it reports exactly what the
 * fast path needs to know (see `fastPathBlocker`). The papaparse-based differential test keeps it honest.
 *
 * State is kept per field: the completed fields of a partial row are held, and only an unfinished
 * field is carried over to the next chunk, so a long row never gets rescanned.
 */

const QUOTE = 34
const LF = 10
const CR = 13

export type CsvSyntaxKind = 'unterminated-quote' | 'text-after-quote' | 'field-too-long' | 'too-many-fields'

/** A problem in the file's structure, with the 1-based record (row) number and 0-based field index. */
export class CsvSyntaxError extends Error {
  constructor(
    readonly kind: CsvSyntaxKind,
    readonly recordNo: number,
    readonly fieldIndex: number,
    readonly length = 0,
  ) {
    super(`${kind} at record ${recordNo}, field ${fieldIndex + 1}`)
    this.name = 'CsvSyntaxError'
  }
}

export interface CsvTokenizerOptions {
  delimiter: string
  /** Longest field accepted; longer ones throw `field-too-long` (also bounds memory for a never-closed quote). */
  maxFieldChars: number
  /** Most fields accepted in one row; more throw `too-many-fields`. */
  maxFieldsPerRow: number
  /** Called once per row. `fields` is reused between calls: copy it to keep it. */
  onRow: (fields: string[], recordNo: number) => void
}

export class CsvTokenizer {
  /**
   * Set when the file uses something PostgreSQL's own CSV reader treats differently from RFC 4180
   * (a quote inside an unquoted field, mixed line endings, a line holding only `\.`). Ingest then
   * stores the rows it parsed instead of handing PostgreSQL the original bytes.
   */
  fastPathBlocker: string | null = null
  /** Rows completed so far, counting the header (also the number of the row in progress minus one). */
  recordsDone = 0

  private readonly delimiter: number
  private readonly fields: string[] = []
  private carry = ''
  private pendingCR = false
  private rowHasQuote = false
  private eolStyle: string | null = null
  private pendingBlankRecords: number[] = []
  private readonly blankFields = ['']

  constructor(private readonly options: CsvTokenizerOptions) {
    if (options.delimiter.length !== 1) throw new Error('delimiter must be one character')
    this.delimiter = options.delimiter.charCodeAt(0)
  }

  push(chunk: string): void {
    this.parse(this.carry ? this.carry + chunk : chunk, false)
  }

  /** Finishes the last row. Blank lines at the very end of a file are ignored (a common export artefact). */
  end(): void {
    this.parse(this.carry, true)
    if (this.fields.length > 0) {
      // The text ended right after a delimiter: the row's last field is empty.
      this.fields.push('')
      this.endRow()
    }
    this.pendingBlankRecords = []
  }

  private noteEol(style: string): void {
    if (this.eolStyle === null) this.eolStyle = style
    else if (this.eolStyle !== style) this.fastPathBlocker ??= 'mixed line endings'
  }

  private parse(text: string, last: boolean): void {
    const n = text.length
    const delimiter = this.delimiter
    const { maxFieldChars } = this.options
    let i = 0
    this.carry = ''
    if (this.pendingCR) {
      if (n === 0 && !last) return
      this.pendingCR = false
      if (n > 0 && text.charCodeAt(0) === LF) {
        this.noteEol('\r\n')
        i = 1
      } else this.noteEol('\r')
    }
    while (i < n) {
      const fieldStart = i
      let c = text.charCodeAt(i)
      let value: string
      if (c === QUOTE) {
        let parts = ''
        let segment = i + 1
        let searchFrom = segment
        let closedAt = -1
        for (;;) {
          const q = text.indexOf('"', searchFrom)
          if (q === -1) break
          if (q + 1 < n) {
            if (text.charCodeAt(q + 1) === QUOTE) {
              parts += text.slice(segment, q + 1)
              segment = q + 2
              searchFrom = segment
              continue
            }
            closedAt = q
            break
          }
          // The quote is the last character: only the end of input tells whether it closes the field.
          if (last) closedAt = q
          break
        }
        if (closedAt === -1) {
          if (last) throw new CsvSyntaxError('unterminated-quote', this.recordsDone + 1, this.fields.length)
          if (n - fieldStart - 1 > maxFieldChars + 1) {
            throw new CsvSyntaxError(
              'field-too-long',
              this.recordsDone + 1,
              this.fields.length,
              n - fieldStart - 1,
            )
          }
          this.carry = text.slice(fieldStart)
          return
        }
        value = parts + text.slice(segment, closedAt)
        i = closedAt + 1
        this.rowHasQuote = true
        if (i < n) {
          c = text.charCodeAt(i)
          if (c !== delimiter && c !== LF && c !== CR) {
            throw new CsvSyntaxError('text-after-quote', this.recordsDone + 1, this.fields.length)
          }
        } else {
          if (!last) {
            this.carry = text.slice(fieldStart)
            return
          }
          c = -1
        }
      } else {
        let j = i
        while (j < n) {
          c = text.charCodeAt(j)
          if (c === delimiter || c === LF || c === CR) break
          if (c === QUOTE) this.fastPathBlocker ??= 'a quote inside an unquoted value'
          j++
        }
        if (j === n) {
          if (!last) {
            if (n - fieldStart > maxFieldChars) {
              throw new CsvSyntaxError(
                'field-too-long',
                this.recordsDone + 1,
                this.fields.length,
                n - fieldStart,
              )
            }
            this.carry = text.slice(fieldStart)
            return
          }
          c = -1
        }
        value = text.slice(i, j)
        i = j
      }
      if (value.length > maxFieldChars) {
        throw new CsvSyntaxError('field-too-long', this.recordsDone + 1, this.fields.length, value.length)
      }
      if (this.fields.length >= this.options.maxFieldsPerRow) {
        throw new CsvSyntaxError('too-many-fields', this.recordsDone + 1, this.fields.length)
      }
      this.fields.push(value)
      if (c === delimiter) {
        i++
        continue
      }
      if (c === CR) {
        if (i + 1 < n) {
          if (text.charCodeAt(i + 1) === LF) {
            this.noteEol('\r\n')
            i += 2
          } else {
            this.noteEol('\r')
            i++
          }
        } else if (last) {
          this.noteEol('\r')
          i++
        } else {
          this.pendingCR = true
          i++
        }
      } else if (c === LF) {
        this.noteEol('\n')
        i++
      }
      this.endRow()
    }
  }

  private endRow(): void {
    const fields = this.fields
    this.recordsDone++
    const blank = fields.length === 1 && fields[0] === '' && !this.rowHasQuote
    this.rowHasQuote = false
    if (blank) {
      // Held back: blank lines are only an error (or a missing value) when more rows follow.
      this.pendingBlankRecords.push(this.recordsDone)
      fields.length = 0
      return
    }
    if (this.pendingBlankRecords.length) {
      for (const recordNo of this.pendingBlankRecords) this.options.onRow(this.blankFields, recordNo)
      this.pendingBlankRecords = []
    }
    if (fields.length === 1 && fields[0] === '\\.') this.fastPathBlocker ??= 'a line holding only \\.'
    this.options.onRow(fields, this.recordsDone)
    fields.length = 0
  }
}
