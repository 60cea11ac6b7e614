import { describe, expect, it } from 'vitest'
import { parseAnalyzeArgs } from './analyze-args'

const base = ['cells.csv', '--response', 'length', '--levels', 'lab,animal']

describe('parseAnalyzeArgs', () => {
  it('reads the required arguments with their defaults', () => {
    expect(parseAnalyzeArgs(base)).toEqual({
      file: 'cells.csv',
      response: 'length',
      levels: ['lab', 'animal'],
      conditions: [],
      covariates: [],
      reference: {},
      bootstrap: null,
      family: 'gaussian',
      trials: undefined,
      positive: undefined,
      delimiter: undefined,
      decimal: undefined,
    })
  })

  it('reads the family, the value counted as yes and a trials column', () => {
    expect(parseAnalyzeArgs([...base, '--family', 'binomial', '--positive', 'positive'])).toMatchObject({
      family: 'binomial',
      positive: 'positive',
      trials: undefined,
    })
    expect(parseAnalyzeArgs([...base, '--family', 'binomial', '--trials', 'neurons'])).toMatchObject({
      family: 'binomial',
      trials: 'neurons',
    })
    expect(parseAnalyzeArgs([...base, '--family', 'poisson'])?.family).toBe('poisson')
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
      conditions: ['treatment'],
      reference: { treatment: 'vehicle' },
      bootstrap: { resamples: 1000, seed: 's1' },
      delimiter: '\t',
      decimal: ',',
    })
    expect(parseAnalyzeArgs([...base, '--delimiter', ';'])?.delimiter).toBe(';')
  })

  it('reads two conditions, covariates and a reference per factor', () => {
    const args = parseAnalyzeArgs([
      ...base,
      '--condition',
      'genotype, treatment',
      '--covariate',
      'soma_area_um2,age_days',
      '--reference',
      'treatment=vehicle,genotype=KO-3',
    ])
    expect(args).toMatchObject({
      conditions: ['genotype', 'treatment'],
      covariates: ['soma_area_um2', 'age_days'],
      reference: { treatment: 'vehicle', genotype: 'KO-3' },
    })
    expect(
      parseAnalyzeArgs([...base, '--condition', 'genotype,treatment', '--reference', 'genotype=WT'])
        ?.reference,
    ).toEqual({ genotype: 'WT' })
    // One factor: the level alone, or FACTOR=LEVEL; a level may itself hold "=" or ",".
    expect(parseAnalyzeArgs([...base, '--condition', 'dose', '--reference', 'dose=0 µM'])?.reference).toEqual(
      {
        dose: '0 µM',
      },
    )
    expect(parseAnalyzeArgs([...base, '--condition', 'dose', '--reference', 'a=b,c'])?.reference).toEqual({
      dose: 'a=b,c',
    })
    expect(parseAnalyzeArgs([...base, '--covariate', 'soma'])).toMatchObject({
      conditions: [],
      covariates: ['soma'],
    })
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
    [[...base, '--condition', 'a,b,c'], /--condition takes at most 2 columns, got 3/],
    [[...base, '--condition', 'a,'], /--condition has an empty column name/],
    [[...base, '--condition', ' '], /--condition has an empty column name/],
    [[...base, '--covariate', 'v,w,x,y,z'], /--covariate takes at most 4 columns/],
    [[...base, '--condition', 'g,t', '--reference', 'WT'], /does not say which condition.*g=LEVEL,t=LEVEL/],
    [[...base, '--condition', 'g,t', '--reference', 'g=WT,dose=1'], /"dose=1" must be FACTOR=LEVEL/],
    [[...base, '--condition', 'g,t', '--reference', 'g=WT,g=KO'], /names "g" twice/],
    [[...base, '--colour', 'red'], /Unknown option '--colour'.*--help/],
    [[...base, '--family', 'gamma'], /--family must be gaussian, binomial or poisson, got "gamma"/],
    [[...base, '--trials', 'n'], /--trials COL needs --family binomial/],
    [[...base, '--family', 'poisson', '--positive', 'yes'], /--positive VALUE needs --family binomial/],
    [[...base, '--family', 'binomial', '--trials', 'n', '--positive', 'yes'], /does not apply with --trials/],
    [
      [...base, '--family', 'binomial', '--trials', 'n', '--bootstrap', '200', '--seed', '1'],
      /does not apply to successes out of --trials/,
    ],
  ])('rejects %j', (argv, message) => {
    expect(() => parseAnalyzeArgs(argv)).toThrow(message)
  })
})
