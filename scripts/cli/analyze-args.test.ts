import { describe, expect, it } from 'vitest'
import { parseAnalyzeArgs } from './analyze-args'

const base = ['cells.csv', '--response', 'length', '--levels', 'lab,animal']

describe('parseAnalyzeArgs', () => {
  it('reads the required arguments with their defaults', () => {
    expect(parseAnalyzeArgs(base)).toEqual({
      file: 'cells.csv',
      response: 'length',
      levels: ['lab', 'animal'],
      condition: null,
      reference: null,
      bootstrap: null,
      delimiter: undefined,
      decimal: '.',
    })
  })

  it('reads every option, including "tab" as a separator', () => {
    const args = parseAnalyzeArgs([
      ...base,
      '--condition',
      'treatment',
      '--reference',
      'vehicle',
      '--bootstrap',
      '1000',
      '--seed',
      's1',
      '--delimiter',
      'tab',
      '--decimal',
      ',',
    ])
    expect(args).toMatchObject({
      condition: 'treatment',
      reference: 'vehicle',
      bootstrap: { resamples: 1000, seed: 's1' },
      delimiter: '\t',
      decimal: ',',
    })
    expect(parseAnalyzeArgs([...base, '--delimiter', ';'])?.delimiter).toBe(';')
  })

  it('returns null for --help and -h', () => {
    expect(parseAnalyzeArgs(['--help'])).toBeNull()
    expect(parseAnalyzeArgs([...base, '-h'])).toBeNull()
  })

  it.each([
    [['--response', 'x', '--levels', 'a'], /No input file/],
    [['a.csv', 'b.csv', '--response', 'x', '--levels', 'a'], /one input file/],
    [['a.csv', '--levels', 'a'], /Missing --response/],
    [['a.csv', '--response', 'x'], /Missing --levels/],
    [['a.csv', '--response', 'x', '--levels', 'a,,b'], /empty name/],
    [['a.csv', '--response', 'x', '--levels', 'a,b,c,d,e'], /1 to 4/],
    [[...base, '--bootstrap', '1000'], /needs --seed/],
    [[...base, '--bootstrap', 'many', '--seed', '1'], /whole number/],
    [[...base, '--seed', '1'], /only applies together with --bootstrap/],
    [[...base, '--delimiter', 'x'], /--delimiter must be/],
    [[...base, '--decimal', ';'], /--decimal must be/],
    [[...base, '--decimal', ',', '--delimiter', ','], /cannot be combined/],
    [[...base, '--reference', 'vehicle'], /--reference needs --condition/],
    [[...base, '--colour', 'red'], /Unknown option '--colour'.*--help/],
  ])('rejects %j', (argv, message) => {
    expect(() => parseAnalyzeArgs(argv)).toThrow(message)
  })
})
