import Papa from 'papaparse'
import seedrandom from 'seedrandom'
import { describe, expect, it } from 'vitest'
import { CsvByteScanner, fieldText } from './csv-byte-scanner'

/** Records as string arrays, with their starting lines, fed in chunks of the given size. */
function scan(text: string, chunkBytes: number, delimiter = ',') {
  const records: string[][] = []
  const lines: number[] = []
  const scanner = new CsvByteScanner(delimiter.charCodeAt(0), (record) => {
    records.push(Array.from({ length: record.count }, (_, f) => fieldText(record, f)))
    lines.push(record.line)
  })
  const bytes = Buffer.from(text)
  for (let at = 0; at < bytes.length; at += chunkBytes) scanner.push(bytes.subarray(at, at + chunkBytes))
  scanner.end()
  return { records, lines }
}

const FIELD_PARTS = ['a', 'lab-01', 'Läb β', '12.5', '', ' ', ';', ',', '\t', '"', '\n', '\r\n', 'é']

/** A random but valid RFC 4180 table: fields with separators, quotes or line breaks are quoted. */
function randomTable(random: () => number, delimiter: string, lineEnd: string): string {
  const rows: string[] = []
  const width = 1 + Math.floor(random() * 5)
  for (let r = 0; r < 1 + Math.floor(random() * 30); r++) {
    const fields: string[] = []
    for (let f = 0; f < width; f++) {
      let field = ''
      for (let k = Math.floor(random() * 4); k > 0; k--)
        field += FIELD_PARTS[Math.floor(random() * FIELD_PARTS.length)]
      const needsQuotes = /[",;\t\r\n]/.test(field) || random() < 0.1
      fields.push(needsQuotes ? `"${field.replaceAll('"', '""')}"` : field)
    }
    rows.push(fields.join(delimiter))
  }
  return rows.join(lineEnd) + (random() < 0.5 ? lineEnd : '')
}

// Reference: papaparse 5 on the same text (a widely used CSV parser); differential test, no published values.
describe('CsvByteScanner', () => {
  it('splits 2,000 random tables exactly as papaparse does, whatever the chunk size', () => {
    const random = seedrandom('csv-byte-scanner')
    for (let k = 0; k < 2000; k++) {
      const delimiter = [',', ';', '\t'][k % 3]
      const newline = k % 2 ? '\r\n' : '\n'
      const text = randomTable(random, delimiter, newline)
      const expected = Papa.parse<string[]>(text, { delimiter, newline }).data
      // papaparse reports the end after a final line break as a record of one empty field; we end there.
      if (text.endsWith(newline) && expected.at(-1)?.length === 1 && expected.at(-1)![0] === '')
        expected.pop()
      for (const chunk of [1, 7, 1 << 16])
        expect(scan(text, chunk, delimiter).records, text).toEqual(expected)
    }
  })

  it('numbers records by the line they start on, counting line breaks inside quotes', () => {
    const { records, lines } = scan('a,b\n"x\ny",1\r\nz,2\rw,3', 3)
    expect(records).toEqual([
      ['a', 'b'],
      ['x\ny', '1'],
      ['z', '2'],
      ['w', '3'],
    ])
    expect(lines).toEqual([1, 2, 4, 5])
  })

  it('names the line of a quote that is never closed or followed by text', () => {
    expect(() => scan('a,b\n1,"open\n', 4)).toThrow('Line 2: a quoted field is never closed.')
    expect(() => scan('a,b\n1,"x"y\n', 4)).toThrow('Line 2: text follows the closing quote of field 2.')
  })

  it('keeps a record that is longer than its buffer', () => {
    const long = 'x'.repeat(3 << 20)
    expect(scan(`a,b\n${long},1\n`, 1 << 16).records[1]).toEqual([long, '1'])
  })
})
