import { describe, expect, it } from 'vitest'
import { CopyTextBuilder, CopyTextLines, decodeCopyTextField, encodeCopyTextRow, fieldEnd } from './copy-text'
import { CsvTokenizer } from '../ingest/csv-tokenizer'

describe('COPY text format', () => {
  it('escapes backslashes, tabs and line breaks and writes NULL for empty cells', () => {
    expect(encodeCopyTextRow(['a', '', null, 'x\ty', 'line\r\nnext', 'C:\\data', '\\.'])).toBe(
      'a\t\\N\t\\N\tx\\ty\tline\\r\\nnext\tC:\\\\data\t\\\\.\n',
    )
  })

  it('builds the same lines from CSV byte rows as from text, and points at a NUL byte', () => {
    const csv = 'a,b,c\r\n"x\ty","line\r\nnext",C:\\data\r\n,µm,"\\."\r\n'
    const builder = new CopyTextBuilder()
    const tokenizer = new CsvTokenizer({
      delimiter: ',',
      maxFieldChars: 100,
      maxFieldsPerRow: 10,
      onRow: (row) => expect(builder.addRow(row)).toBe(-1),
    })
    tokenizer.push(Buffer.from(csv))
    tokenizer.end()
    const expected = [
      ['a', 'b', 'c'],
      ['x\ty', 'line\r\nnext', 'C:\\data'],
      ['', 'µm', '\\.'],
    ]
    expect(builder.take().toString('utf8')).toBe(expected.map((r) => encodeCopyTextRow(r)).join(''))
    expect(builder.length).toBe(0)
    const withNul = new CsvTokenizer({
      delimiter: ',',
      maxFieldChars: 100,
      maxFieldsPerRow: 10,
      onRow: (row) => expect(builder.addRow(row)).toBe(1),
    })
    withNul.push(Buffer.from('a,b\u0000c\n'))
    withNul.end()
  })

  it('round-trips through the reader at any chunk boundary, multi-byte characters included', () => {
    const rows = [
      ['µm', 'é\tà', null],
      ['x\\y', 'a\nb', '3'],
    ]
    const bytes = Buffer.from(rows.map((r) => encodeCopyTextRow(r)).join(''))
    for (let cut = 1; cut < bytes.length; cut++) {
      const out: (string | null)[][] = []
      const reader = new CopyTextLines((text, start, end) => {
        const fields: (string | null)[] = []
        for (let from = start; ;) {
          const to = fieldEnd(text, from, end)
          fields.push(decodeCopyTextField(text.slice(from, to)))
          if (to === end) break
          from = to + 1
        }
        out.push(fields)
      })
      reader.push(bytes.subarray(0, cut))
      reader.push(bytes.subarray(cut))
      reader.end()
      expect(out).toEqual(rows)
    }
  })
})
