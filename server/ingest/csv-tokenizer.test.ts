import Papa from 'papaparse'
import seedrandom from 'seedrandom'
import { describe, expect, it } from 'vitest'
import { CsvSyntaxError, CsvTokenizer, rowFields } from './csv-tokenizer'

type Chunk = string | Buffer

function tokenize(chunks: Chunk[], delimiter = ',', limits = { maxFieldChars: 1000, maxFieldsPerRow: 100 }) {
  const rows: { fields: string[]; recordNo: number }[] = []
  const tokenizer = new CsvTokenizer({
    delimiter,
    ...limits,
    onRow: (row, recordNo) => rows.push({ fields: rowFields(row), recordNo }),
  })
  for (const chunk of chunks) tokenizer.push(typeof chunk === 'string' ? Buffer.from(chunk, 'utf8') : chunk)
  tokenizer.end()
  return { rows, tokenizer }
}

const fieldsOf = (chunks: Chunk[], delimiter = ',') => tokenize(chunks, delimiter).rows.map((r) => r.fields)

/** Every way to cut `text`'s bytes into two chunks, plus one-byte chunks: boundaries must not matter. */
function splits(text: string): Buffer[][] {
  const bytes = Buffer.from(text, 'utf8')
  const out: Buffer[][] = [[bytes], [...bytes].map((b) => Buffer.from([b]))]
  for (let k = 1; k < bytes.length; k++) out.push([bytes.subarray(0, k), bytes.subarray(k)])
  return out
}

describe('CsvTokenizer', () => {
  it('reads plain rows with LF, CRLF and CR line endings', () => {
    for (const eol of ['\n', '\r\n', '\r']) {
      const text = `a,b${eol}1,2${eol}3,4${eol}`
      for (const chunks of splits(text)) {
        expect(fieldsOf(chunks)).toEqual([
          ['a', 'b'],
          ['1', '2'],
          ['3', '4'],
        ])
      }
    }
  })

  it('handles quoted delimiters, doubled quotes and newlines inside quotes at any chunk boundary', () => {
    const text = 'name,note\r\n"Smith, J.","said ""hi"" in µm\r\nthen left"\r\nx,""\r\n'
    for (const chunks of splits(text)) {
      expect(fieldsOf(chunks)).toEqual([
        ['name', 'note'],
        ['Smith, J.', 'said "hi" in µm\r\nthen left'],
        ['x', ''],
      ])
    }
  })

  it('keeps a last row without a newline and an empty last field after a trailing delimiter', () => {
    expect(fieldsOf(['a,b\n1,'])).toEqual([
      ['a', 'b'],
      ['1', ''],
    ])
    expect(fieldsOf(['a,b\n1,2'])).toEqual([
      ['a', 'b'],
      ['1', '2'],
    ])
  })

  it('ignores blank lines at the end but reports blank lines between rows with their row number', () => {
    expect(fieldsOf(['a,b\n1,2\n\n\r\n'])).toEqual([
      ['a', 'b'],
      ['1', '2'],
    ])
    const { rows } = tokenize(['a,b\n1,2\n\n3,4\n'])
    expect(rows.map((r) => [r.recordNo, r.fields])).toEqual([
      [1, ['a', 'b']],
      [2, ['1', '2']],
      [3, ['']],
      [4, ['3', '4']],
    ])
  })

  it('uses the tab or semicolon as delimiter when told', () => {
    expect(fieldsOf(['a\tb\n1,5\t2,5\n'], '\t')).toEqual([
      ['a', 'b'],
      ['1,5', '2,5'],
    ])
    expect(fieldsOf(['a;b\n"x;y";2\n'], ';')).toEqual([
      ['a', 'b'],
      ['x;y', '2'],
    ])
  })

  it('flags what PostgreSQL reads differently, so ingest stores parsed rows instead of raw bytes', () => {
    expect(tokenize(['a,b\n1,2\n']).tokenizer.fastPathBlocker).toBeNull()
    expect(tokenize(['a,b\r\n1,2\n3,4\n']).tokenizer.fastPathBlocker).toBe('mixed line endings')
    expect(tokenize(['a,b\n1,x"y\n']).tokenizer.fastPathBlocker).toBe('a quote inside an unquoted value')
    expect(tokenize(['a\n\\.\n2\n']).tokenizer.fastPathBlocker).toBe('a line holding only \\.')
  })

  it('throws with row and field for an unterminated quote, text after a quote, and over-long fields', () => {
    const error = (chunks: Chunk[], limits?: { maxFieldChars: number; maxFieldsPerRow: number }) => {
      try {
        tokenize(chunks, ',', limits)
      } catch (e) {
        return e as CsvSyntaxError
      }
      throw new Error('expected a CsvSyntaxError')
    }
    expect(error(['a,b\n1,"open\n2,3\n'])).toMatchObject({
      kind: 'unterminated-quote',
      recordNo: 2,
      fieldIndex: 1,
    })
    expect(error(['a,b\n1,"x"y\n'])).toMatchObject({
      kind: 'text-after-quote',
      recordNo: 2,
      fieldIndex: 1,
      line: 2,
    })
    const long = 'x'.repeat(11)
    expect(error([`a,b\n1,${long}\n`], { maxFieldChars: 10, maxFieldsPerRow: 5 })).toMatchObject({
      kind: 'field-too-long',
      recordNo: 2,
      fieldIndex: 1,
      length: 11,
    })
    // The limit counts characters as String.length does, not bytes: 10 × "µ" is 20 bytes but fits.
    const limits = { maxFieldChars: 10, maxFieldsPerRow: 5 }
    expect(tokenize([`a,b\n1,"${'µ'.repeat(10)}"\n`], ',', limits).rows[1].fields[1]).toBe('µ'.repeat(10))
    expect(error([`a,b\n1,${'😀'.repeat(6)}\n`], limits)).toMatchObject({
      kind: 'field-too-long',
      length: 12,
    })
    // A never-closed quote stops at the field limit instead of reading the whole file into memory.
    const chunks = ['a,b\n1,"', ...Array.from({ length: 50 }, () => 'yyyyyyyyyy')]
    expect(error(chunks, { maxFieldChars: 100, maxFieldsPerRow: 5 })).toMatchObject({
      kind: 'field-too-long',
      recordNo: 2,
    })
    expect(error(['a,b,c,d,e,f\n'], { maxFieldChars: 10, maxFieldsPerRow: 5 })).toMatchObject({
      kind: 'too-many-fields',
      recordNo: 1,
    })
  })

  it('numbers rows by the line they start on, counting line breaks inside quotes', () => {
    const lines: number[] = []
    const tokenizer = new CsvTokenizer({
      delimiter: ',',
      maxFieldChars: 100,
      maxFieldsPerRow: 10,
      onRow: (row) => lines.push(row.line),
    })
    const bytes = Buffer.from('a,b\n"x\ny",1\n\nz,2\n"p\n\nq",3\nw,"4"x\n')
    let failure: unknown = null
    try {
      for (let at = 0; at < bytes.length; at += 3) tokenizer.push(bytes.subarray(at, at + 3))
    } catch (error) {
      failure = error
    }
    // Record 6 starts on line 9: two line breaks inside quotes came before it.
    expect(failure).toMatchObject({ kind: 'text-after-quote', recordNo: 6, line: 9 })
    expect(lines).toEqual([1, 2, 4, 5, 6])
  })

  it('splits 2,000 random tables exactly as papaparse does, whatever the chunk size', () => {
    // Reference: papaparse 5 on the same text (the stack's CSV parser); differential test, no published values.
    const random = seedrandom('tokenizer-differential')
    const parts = ['a', 'lab-01', 'Läb β', '12.5', '', ' ', ';', ',', '\t', '"', '\n', '\r\n', 'é', '😀']
    for (let trial = 0; trial < 2000; trial++) {
      const delimiter = [',', ';', '\t'][trial % 3]
      const eol = trial % 2 ? '\r\n' : '\n'
      const width = 1 + Math.floor(random() * 5)
      const rows: string[] = []
      for (let r = 0; r < 1 + Math.floor(random() * 30); r++) {
        const fields: string[] = []
        for (let f = 0; f < width; f++) {
          // A first field that starts with a letter keeps rows from being blank lines (tested above).
          let field = f === 0 ? 'r' : ''
          for (let k = Math.floor(random() * 4); k > 0; k--)
            field += parts[Math.floor(random() * parts.length)]
          const needsQuotes = /[",;\t\r\n]/.test(field) || random() < 0.1
          fields.push(needsQuotes ? `"${field.replaceAll('"', '""')}"` : field)
        }
        rows.push(fields.join(delimiter))
      }
      const text = rows.join(eol) + (random() < 0.5 ? eol : '')
      const expected = Papa.parse<string[]>(text, { delimiter, newline: eol, skipEmptyLines: true }).data
      // Cut anywhere, also inside a character: only ASCII bytes have a meaning to the reader.
      const bytes = Buffer.from(text, 'utf8')
      for (const size of [1, 7, 1 << 16]) {
        const chunks: Buffer[] = []
        for (let at = 0; at < bytes.length; at += size) chunks.push(bytes.subarray(at, at + size))
        expect(fieldsOf(chunks, delimiter), text).toEqual(expected)
      }
    }
  })

  it('keeps a row that is longer than its buffer', () => {
    const long = 'x'.repeat(3 << 20)
    const rows = tokenize([`a,b\n${long},1\n`], ',', { maxFieldChars: 4 << 20, maxFieldsPerRow: 5 }).rows
    expect(rows[1].fields).toEqual([long, '1'])
  })
})
