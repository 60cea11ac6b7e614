import Papa from 'papaparse'
import { describe, expect, it } from 'vitest'
import { csvFilename, neutraliseCell, quoteCsvField, unitsCsv } from './units-csv'

describe('neutraliseCell', () => {
  it.each(['=SUM(A1)', '+1', '-2+3', '@cmd', '\tx', '\rx'])(
    'prefixes a quote to %j (OWASP CSV injection guidance)',
    (text) => {
      expect(neutraliseCell(text)).toBe(`'${text}`)
    },
  )
  it.each(['m01', 'NW-117', ' =x', "'=x", ''])('leaves %j alone', (text) => {
    expect(neutraliseCell(text)).toBe(text)
  })
})

describe('quoteCsvField', () => {
  it('quotes commas, quotes and line breaks and doubles inner quotes (RFC 4180)', () => {
    expect(quoteCsvField('a,b')).toBe('"a,b"')
    expect(quoteCsvField('say "hi"')).toBe('"say ""hi"""')
    expect(quoteCsvField('two\nlines')).toBe('"two\nlines"')
    expect(quoteCsvField('plain')).toBe('plain')
  })
})

describe('unitsCsv', () => {
  const chart = {
    unitLevels: [
      {
        level: 'lab',
        roles: ['outer' as const],
        units: [
          {
            path: ['=HYPERLINK("x")'],
            label: '=HYPERLINK("x")',
            condition: '+dose',
            n: 3,
            mean: -1.5,
            sd: 0.25,
          },
        ],
      },
      {
        level: 'mouse',
        roles: ['condition-level' as const, 'innermost' as const],
        units: [
          {
            path: ['=HYPERLINK("x")', 'm,1'],
            label: '=HYPERLINK("x") / m,1',
            condition: null,
            n: 1,
            mean: 2,
            sd: null,
          },
        ],
      },
    ],
  }

  it('writes one line per unit cell, neutralised and quoted, that a CSV parser reads back', () => {
    const text = unitsCsv(chart)
    expect(text.endsWith('\r\n')).toBe(true)
    const parsed = Papa.parse<string[]>(text.trimEnd(), { newline: '\r\n' }).data
    expect(parsed).toEqual([
      ['level', 'unit', 'condition', 'n', 'mean', 'sd'],
      ['lab', `'=HYPERLINK("x")`, "'+dose", '3', '-1.5', '0.25'],
      ['mouse', `'=HYPERLINK("x") / m,1`, '', '1', '2', ''],
    ])
  })
})

describe('csvFilename', () => {
  it('keeps letters, digits, - and _ and names the version', () => {
    expect(csvFilename('Neurite length – vehicle vs NW-117', 2)).toBe(
      'Neurite-length-vehicle-vs-NW-117-v2-units.csv',
    )
    expect(csvFilename('../../etc/passwd"\r\nX: y', 1)).toBe('etc-passwd-X-y-v1-units.csv')
    expect(csvFilename('Über Zellen', 1)).toBe('Uber-Zellen-v1-units.csv')
    expect(csvFilename('???', 3)).toBe('analysis-v3-units.csv')
  })
})
