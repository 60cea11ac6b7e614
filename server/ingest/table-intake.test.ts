import { describe, expect, it } from 'vitest'
import { AppError } from '../errors/app-error'
import seedrandom from 'seedrandom'
import { CsvTokenizer } from './csv-tokenizer'
import { isIntegerText, parseNumberText, trimCell } from '../rows-store/number-text'
import { headerName, TableIntake } from './table-intake'

const limits = {
  maxColumns: 5,
  maxFieldChars: 20,
  maxNameChars: 30,
  naValues: ['', 'NA', 'NaN'],
  distinctCap: 4,
}

function intakeOf(rows: (string | null)[][], decimalMark: '.' | ',' = '.') {
  const intake = new TableIntake(limits, decimalMark)
  rows.forEach((row, k) => intake.addRow(row, k + 1))
  return intake.finish()
}

function refusal(rows: (string | null)[][]): AppError {
  try {
    intakeOf(rows)
  } catch (e) {
    if (e instanceof AppError) return e
    throw e
  }
  throw new Error('expected the table to be refused')
}

describe('header names', () => {
  it('lose quotes wrapped around the whole name, as an export leaves them', () => {
    const result = intakeOf([
      [' "lab"', '""mouse""', '“soma area”', "'cell'", 'a "b" c'],
      ['Nimbus', 'm1', '1.5', 'c1', 'x'],
      ['Fernhill', 'm2', '2.5', 'c2', 'y'],
    ])
    expect(result.columnNames).toEqual(['lab', 'mouse', 'soma area', 'cell', 'a "b" c'])
    expect(headerName('"')).toBe('"')
  })

  it('are checked for duplicates after the quotes go', () => {
    expect(
      refusal([
        ['lab', '"lab"'],
        ['a', 'b'],
        ['c', 'd'],
      ]).details,
    ).toMatchObject({ reason: 'DUPLICATE_HEADER' })
  })
})

describe('TableIntake', () => {
  it('profiles types, missing values, distinct counts, range, mean and SD', () => {
    const result = intakeOf([
      ['animal', 'length', 'count', 'note'],
      ['m1', '1.5', '3', 'x'],
      ['m1', 'NA', '4', ''],
      ['m2', '2.5', ' 5 ', 'NaN'],
      ['m2', '3.5', null, 'y'],
    ])
    expect(result.rowCount).toBe(4)
    const [animal, length, count, note] = result.profiles
    expect(animal).toMatchObject({
      type: 'text',
      distinctCount: 2,
      missingCount: 0,
      min: null,
      topValues: [
        { value: 'm1', count: 2 },
        { value: 'm2', count: 2 },
      ],
    })
    // mean of 1.5, 2.5, 3.5 = 2.5; sample SD = 1 (by hand)
    expect(length).toMatchObject({
      type: 'numeric',
      missingCount: 1,
      distinctCount: 3,
      min: 1.5,
      max: 3.5,
      mean: 2.5,
      sd: 1,
    })
    expect(count).toMatchObject({ type: 'integer', missingCount: 1, min: 3, max: 5, mean: 4 })
    expect(note).toMatchObject({ type: 'text', missingCount: 2, distinctCount: 2 })
    expect(result.codes[0]!.labels).toEqual(['m1', 'm2'])
    expect(Array.from(result.codes[0]!.codes)).toEqual([0, 0, 1, 1])
  })

  it('reads decimal commas when the file uses them and caps distinct counts', () => {
    const result = intakeOf(
      [['v'], ['1,5'], ['2,5'], ['3,5'], ['4,5'], ['5,5'], ['6,5']].map((r) => r),
      ',',
    )
    expect(result.profiles[0]).toMatchObject({
      type: 'numeric',
      min: 1.5,
      max: 6.5,
      distinctCount: 4,
      distinctCapped: true,
      topValues: null,
    })
    expect(result.codes[0]).toBeNull()
  })

  it('refuses blank, duplicate, over-long names and too many columns, naming the column', () => {
    expect(refusal([['a', ' ', 'c']]).message).toContain('Column 2 has no name')
    expect(refusal([['a', 'b', 'a']]).message).toContain('Columns 1 and 3 are both named "a"')
    expect(refusal([['a', 'x'.repeat(31)]]).details).toMatchObject({
      reason: 'NAME_TOO_LONG',
      columnNumber: 2,
    })
    expect(refusal([['a', 'b', 'c', 'd', 'e', 'f']]).details).toMatchObject({ reason: 'TOO_MANY_COLUMNS' })
  })

  it('names row and column for ragged rows, blank rows and over-long values', () => {
    const short = refusal([
      ['a', 'b', 'c'],
      ['1', '2', '3'],
      ['4', '5'],
    ])
    expect(short.message).toContain('Row 3 has 2 values, but the header names 3 columns')
    expect(short.message).toContain('column 3 ("c")')
    expect(
      refusal([
        ['a', 'b'],
        ['1', '2', '3'],
      ]).details,
    ).toMatchObject({ reason: 'RAGGED_ROW', row: 2 })
    expect(refusal([['a', 'b'], ['1', '2'], ['']]).details).toMatchObject({ reason: 'BLANK_ROW', row: 3 })
    expect(
      refusal([
        ['a', 'b'],
        ['1', 'y'.repeat(21)],
      ]).message,
    ).toContain('Row 2, column 2 ("b"): the value is 21 characters long')
  })

  it('refuses empty files, header-only files, a single row, and numbers that overflow', () => {
    expect(refusal([]).details).toMatchObject({ reason: 'EMPTY_FILE' })
    expect(refusal([['a', 'b']]).details).toMatchObject({ reason: 'HEADER_ONLY' })
    const one = refusal([
      ['a', 'b'],
      ['1', '2'],
    ])
    expect(one.status).toBe(422)
    const overflow = refusal([
      ['a', 'b'],
      ['1', '2'],
      ['2', '1e400'],
    ])
    expect(overflow.message).toContain('Row 3, column 2 ("b"): 1e400 is too large')
    // In a text column the same characters are just text.
    expect(
      intakeOf([
        ['a', 'b'],
        ['x', 'y'],
        ['1e400', 'z'],
      ]).profiles[0].type,
    ).toBe('text')
  })

  it('profiles CSV bytes exactly as the same cells given as text, trimming and coding as trimCell says', () => {
    // Independent oracle (common practice, no source): labels are the distinct trimCell() texts in
    // first-seen order, NA values excluded; missing cells are those whose trimmed text is an NA value.
    const random = seedrandom('intake-bytes-vs-text')
    const pieces = [
      ' ',
      '\t',
      '\u00a0',
      'µ',
      'é',
      '😀',
      'NA',
      'NaN',
      '1',
      '2',
      '.',
      '-',
      'x',
      '"',
      ',',
      '\n',
      'e',
      '7',
      '0',
    ]
    const numeric = ['1', '2', '7', '0', '.', '-', 'e', ' ', '12.5', '3', '-0.25', 'NA']
    const generous = { ...limits, distinctCap: 1000 }
    for (let trial = 0; trial < 200; trial++) {
      const rows: string[][] = [['a', 'b', 'c']]
      for (let r = 0; r < 2 + Math.floor(random() * 12); r++) {
        const row: string[] = []
        for (let c = 0; c < 3; c++) {
          // The last column mostly holds numbers, so numeric profiles are compared too.
          const from = c === 2 ? numeric : pieces
          let cell = ''
          for (let k = Math.floor(random() * 4); k > 0; k--) cell += from[Math.floor(random() * from.length)]
          row.push(cell)
        }
        rows.push(row)
      }
      const fromText = new TableIntake(generous, '.')
      rows.forEach((row, k) => fromText.addRow(row, k + 1))
      const textResult = fromText.finish()

      const csv = rows.map((row) => row.map((v) => `"${v.replaceAll('"', '""')}"`).join(',')).join('\r\n')
      const fromBytes = new TableIntake(generous, '.')
      const tokenizer = new CsvTokenizer({
        delimiter: ',',
        maxFieldChars: generous.maxFieldChars,
        maxFieldsPerRow: 10,
        onRow: (row, recordNo) => fromBytes.addCsvRow(row, recordNo),
      })
      const bytes = Buffer.from(csv, 'utf8')
      const cut = Math.floor(random() * bytes.length)
      tokenizer.push(bytes.subarray(0, cut))
      tokenizer.push(bytes.subarray(cut))
      tokenizer.end()
      const byteResult = fromBytes.finish()
      expect(byteResult.profiles).toEqual(textResult.profiles)
      expect(byteResult.codes).toEqual(textResult.codes)

      for (let c = 0; c < 3; c++) {
        const trimmed = rows.slice(1).map((row) => trimCell(row[c]))
        const present = trimmed.filter((t) => !limits.naValues.includes(t))
        expect(textResult.profiles[c].missingCount).toBe(trimmed.length - present.length)
        const codes = textResult.codes[c]
        if (codes) expect(codes.labels).toEqual([...new Set(present)])
        // Types and ranges against the regular expressions and Number() of number-text.ts.
        const values = present.map((t) => parseNumberText(t, '.'))
        const profile = textResult.profiles[c]
        const expectedType =
          present.length === 0
            ? 'empty'
            : values.some(Number.isNaN)
              ? 'text'
              : present.every(isIntegerText)
                ? 'integer'
                : 'numeric'
        expect(profile.type).toBe(expectedType)
        if (expectedType === 'integer' || expectedType === 'numeric') {
          expect(profile.min).toBe(Math.min(...values))
          expect(profile.max).toBe(Math.max(...values))
        }
      }
    }
  })
})
