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

describe('unitsCsv with two condition factors', () => {
  // An invented genotype × treatment design; mouse m1 carries one cell, mouse m2 has coverslips of two.
  const chart = {
    unitLevels: [
      {
        level: 'mouse',
        roles: ['condition-level' as const, 'innermost' as const],
        units: [
          { path: ['m1'], label: 'm1', condition: 'WT:vehicle', n: 2, mean: 10, sd: 1 },
          { path: ['m2'], label: 'm2', condition: 'KO:vehicle', n: 3, mean: 12, sd: 2 },
          { path: ['m2'], label: 'm2', condition: 'KO:=KX-9', n: 1, mean: 15, sd: null },
        ],
      },
    ],
  }
  const cell = (genotype: string, treatment: string) => ({
    condition: `${genotype}:${treatment}`,
    factorLevels: { genotype, treatment },
  })
  const design = {
    factors: [
      { name: 'genotype', labels: ['WT', 'KO'], reference: 'WT', level: 'mouse' },
      { name: 'treatment', labels: ['vehicle', '=KX-9'], reference: 'vehicle', level: null },
    ],
    groups: [cell('WT', 'vehicle'), cell('KO', 'vehicle'), cell('KO', '=KX-9')],
  }

  it('splits units by design cell with one column per factor, neutralised like any text', () => {
    const parsed = Papa.parse<string[]>(unitsCsv(chart, design).trimEnd(), { newline: '\r\n' }).data
    expect(parsed).toEqual([
      ['level', 'unit', 'genotype', 'treatment', 'n', 'mean', 'sd'],
      ['mouse', 'm1', 'WT', 'vehicle', '2', '10', '1'],
      ['mouse', 'm2', 'KO', 'vehicle', '3', '12', '2'],
      ['mouse', 'm2', 'KO', "'=KX-9", '1', '15', ''],
    ])
  })

  it('keeps the one condition column for one factor, and for a result of engine 0.1 without factors', () => {
    const one = { factors: [design.factors[0]], groups: [] }
    for (const d of [one, undefined, null, { groups: [] }])
      expect(unitsCsv(chart, d).split('\r\n')[0]).toBe('level,unit,condition,n,mean,sd')
  })

  it('tells a factor named like a fixed column apart', () => {
    const named = { ...design, factors: [design.factors[0], { ...design.factors[1], name: 'n' }] }
    expect(unitsCsv(chart, named).split('\r\n')[0]).toBe('level,unit,genotype,n (condition),n,mean,sd')
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

describe('unitsCsv of binary and count responses', () => {
  const unit = (mean: number, n: number, extra: object = {}) => ({
    path: ['m1'],
    label: 'm1',
    condition: 'vehicle',
    n,
    mean,
    sd: null,
    ...extra,
  })
  const levels = (u: ReturnType<typeof unit>) => [
    { level: 'mouse', roles: ['condition-level' as const], units: [u] },
  ]

  it('gives a yes/no unit its yes count, trials and proportion', () => {
    const csv = unitsCsv({ family: 'binomial', unitLevels: levels(unit(0.25, 8)) })
    expect(csv).toBe('level,unit,condition,n,successes,trials,proportion\r\nmouse,m1,vehicle,8,2,8,0.25\r\n')
  })

  it('gives successes out of summed trials when the table held trials', () => {
    const csv = unitsCsv({ family: 'binomial', unitLevels: levels(unit(7 / 40, 2, { trials: 40 })) })
    expect(csv.split('\r\n')[1]).toBe('mouse,m1,vehicle,2,7,40,0.175')
  })

  it('gives a count unit its summed count and rate per observation', () => {
    const csv = unitsCsv({ family: 'poisson', unitLevels: levels(unit(2.5, 4, { sd: 1 })) })
    expect(csv).toBe('level,unit,condition,n,count,rate,sd\r\nmouse,m1,vehicle,4,10,2.5,1\r\n')
  })
})
