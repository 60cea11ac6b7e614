import { describe, expect, it } from 'vitest'
import { parsePlanArgs } from './plan-args'

describe('parsePlanArgs', () => {
  it('reads typed-in values with the defaults', () => {
    expect(parsePlanArgs(['--difference', '1', '--icc', '0.1', '--variance', '5', '--obs', '10'])).toEqual({
      from: null,
      icc: 0.1,
      sd: null,
      variance: 5,
      difference: 1,
      alpha: 0.05,
      power: 0.8,
      arms: 2,
      units: null,
      obs: 10,
      costUnit: null,
      costObs: null,
      maxUnits: null,
      maxObs: null,
      gridUnits: null,
      gridObs: null,
    })
  })

  it('reads costs, limits, grids and a saved analysis', () => {
    const args = parsePlanArgs([
      '--from',
      'result.json',
      '--difference=-2.5',
      '--cost-unit',
      '400',
      '--cost-obs',
      '2',
      '--max-units',
      '12',
      '--max-obs',
      '200',
      '--grid-units',
      '4,8,16',
      '--grid-obs',
      '10,50',
      '--arms',
      '3',
      '--alpha',
      '0.01',
      '--power',
      '0.9',
    ])
    expect(args).toMatchObject({
      from: 'result.json',
      icc: null,
      difference: -2.5,
      costUnit: 400,
      costObs: 2,
      maxUnits: 12,
      maxObs: 200,
      gridUnits: [4, 8, 16],
      gridObs: [10, 50],
      arms: 3,
      alpha: 0.01,
      power: 0.9,
    })
  })

  it('returns null for --help', () => {
    expect(parsePlanArgs(['--help'])).toBeNull()
  })

  const spread = ['--icc', '0.1', '--sd', '2']
  it.each([
    [[...spread, '--obs', '10'], /Missing --difference/],
    [['--difference', '1', '--sd', '2', '--obs', '10'], /Missing --icc/],
    [['--difference', '1', '--icc', '0.1', '--obs', '10'], /Missing --sd/],
    [['--difference', '1', ...spread, '--variance', '4', '--obs', '3'], /not both/],
    [['--difference', '0', ...spread, '--obs', '3'], /--difference must be a non-zero number/],
    [
      ['--difference', '1', '--icc', '1.5', '--sd', '2', '--obs', '3'],
      /--icc must be a number from 0 to 1, got "1.5"/,
    ],
    [
      ['--difference', '1', ...spread, '--units', '1', '--obs', '3'],
      /--units must be a whole number of at least 2/,
    ],
    [['--difference', '1', ...spread, '--units', '8'], /needs --obs/],
    [['--difference', '1', ...spread, '--cost-unit', '5'], /go together/],
    [
      ['--difference', '1', ...spread, '--grid-units', '4,x', '--grid-obs', '2'],
      /--grid-units must be whole numbers/,
    ],
    [['--difference', '1', ...spread, '--obs', '4', '--max-units', '9'], /add --cost-unit/],
    [['--difference', '1', ...spread], /Nothing to plan/],
    [['--difference', '1', ...spread, '--obs', '4', '--budget', '9'], /Unknown option '--budget'/],
  ])('rejects %j', (argv, message) => {
    expect(() => parsePlanArgs(argv)).toThrow(message)
  })
})
