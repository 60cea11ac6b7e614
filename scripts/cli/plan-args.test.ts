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
      labs: null,
      costLab: null,
      labArmVariance: null,
      oneArmPerLab: false,
      labVariance: null,
    })
  })

  it('reads the outer level: a number of labs or a range, its cost and the lab × condition variance', () => {
    const spread = ['--difference', '8', '--icc', '0.17', '--sd', '11']
    expect(
      parsePlanArgs([
        ...spread,
        '--labs',
        '2-12',
        '--lab-arm-variance',
        '2',
        '--cost-lab',
        '2000',
        '--cost-unit',
        '100',
        '--cost-obs',
        '1',
      ]),
    ).toMatchObject({ labs: { min: 2, max: 12 }, labArmVariance: 2, costLab: 2000, oneArmPerLab: false })
    expect(parsePlanArgs([...spread, '--labs', '4', '--units', '6', '--obs', '20'])).toMatchObject({
      labs: { min: 4, max: 4 },
      units: 6,
      obs: 20,
    })
    expect(
      parsePlanArgs([
        ...spread,
        '--labs',
        '3..8',
        '--one-arm-per-lab',
        '--lab-variance',
        '5',
        '--cost-unit',
        '1',
        '--cost-obs',
        '1',
      ]),
    ).toMatchObject({ labs: { min: 3, max: 8 }, oneArmPerLab: true, labVariance: 5 })
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
    [
      ['--difference', '1', ...spread, '--obs', '4', '--units', '3', '--cost-lab', '9'],
      /--cost-lab needs --labs/,
    ],
    [
      ['--difference', '1', ...spread, '--units', '3', '--obs', '4', '--lab-arm-variance', '1'],
      /--lab-arm-variance needs --labs/,
    ],
    [
      ['--difference', '1', ...spread, '--labs', '0', '--units', '3', '--obs', '4'],
      /--labs must be a whole number from 1 to 1000/,
    ],
    [
      ['--difference', '1', ...spread, '--labs', '8-3', '--cost-unit', '1', '--cost-obs', '1'],
      /or a range like 2-12, got "8-3"/,
    ],
    [
      ['--difference', '1', ...spread, '--labs', '2-8', '--units', '3', '--obs', '4'],
      /is a range for the cheapest design/,
    ],
    [
      ['--difference', '1', ...spread, '--labs', '4', '--obs', '4'],
      /With --labs, give --units K and --obs M/,
    ],
    [
      ['--difference', '1', ...spread, '--labs', '4', '--units', '3', '--obs', '4', '--lab-variance', '2'],
      /--lab-variance goes with --one-arm-per-lab/,
    ],
    [
      [
        '--difference',
        '1',
        ...spread,
        '--labs',
        '4',
        '--units',
        '3',
        '--obs',
        '4',
        '--one-arm-per-lab',
        '--lab-arm-variance',
        '2',
      ],
      /give --lab-variance only/,
    ],
    [
      ['--difference', '1', ...spread, '--labs', '4', '--units', '3', '--obs', '4', '--lab-arm-variance=-1'],
      /--lab-arm-variance must be a number of at least 0/,
    ],
  ])('rejects %j', (argv, message) => {
    expect(() => parsePlanArgs(argv)).toThrow(message)
  })
})
