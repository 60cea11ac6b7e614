import { describe, expect, it } from 'vitest'
import { CopyTextLines, decodeCopyTextField, encodeCopyTextRow, fieldEnd } from './copy-text'

describe('COPY text format', () => {
  it('escapes backslashes, tabs and line breaks and writes NULL for empty cells', () => {
    expect(encodeCopyTextRow(['a', '', null, 'x\ty', 'line\r\nnext', 'C:\\data', '\\.'])).toBe(
      'a\t\\N\t\\N\tx\\ty\tline\\r\\nnext\tC:\\\\data\t\\\\.\n',
    )
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
