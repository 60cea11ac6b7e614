import { parseArgs } from 'node:util'
import { CliInputError } from './cli-input-error'

export interface PlanArgs {
  /** Analysis result (JSON from `nestwise analyze`) to take the ICC and SD from. */
  from: string | null
  icc: number | null
  sd: number | null
  variance: number | null
  difference: number
  alpha: number
  power: number
  arms: number
  units: number | null
  obs: number | null
  costUnit: number | null
  costObs: number | null
  maxUnits: number | null
  maxObs: number | null
  gridUnits: number[] | null
  gridObs: number[] | null
  /** Labs (or days, plates): a fixed number, or a range for the cheapest design; null plans as before (one lab, two levels). */
  labs: { min: number; max: number } | null
  costLab: number | null
  /** σ²_lab×arm: how much a lab's arm mean departs from what its lab and arm predict (every lab runs every arm). */
  labArmVariance: number | null
  /** Each lab runs one arm (labs per arm), instead of every lab running every arm. */
  oneArmPerLab: boolean
  /** With --one-arm-per-lab: variance between labs' means in one arm (σ²_lab + σ²_lab×arm). */
  labVariance: number | null
}

export const PLAN_HELP = `Usage: nestwise plan --difference D (--icc R --sd S | --from RESULT.json) [what to plan] [options]

Plans a comparison in which whole units (e.g. animals) are assigned to the arms and each gives m
observations (e.g. cells). Power comes from the noncentral t with 2(k − 1) df and noncentrality
√(k m / (2 deff)) · D / SD, deff = 1 + (m − 1)·ICC. Prints one JSON document on stdout.

Effect and spread:
  --difference D          smallest difference between arm means worth detecting (response units;
                          its sign does not matter, write a negative one as --difference=-2.5)
  --icc R                 correlation of two observations in the same unit (0–1)
  --sd S | --variance V   total SD (or variance) of one observation, all levels together
  --from RESULT.json      take ICC and SD from a saved 'nestwise analyze' result: the ICC of the level
                          that carries the condition (innermost level without a condition), the SD from
                          all variance components; --icc / --sd override either

What to plan (any combination, at least one):
  --units K --obs M       power with K units per arm and M observations per unit
  --obs M                 (without --units) units per arm needed for the target power
  --cost-unit C --cost-obs C
                          cheapest design reaching the target power, and the cost-optimal M
  --grid-units K1,K2,... --grid-obs M1,M2,...
                          power over a grid of designs (for a chart)

Options:
Labs (or days, plates: any outer level), for a comparison within labs:
  --labs L | --labs L1-L2 number of labs, or a range to search for the cheapest design; with it the
                          plan has three levels (labs, units per lab and arm, observations per unit)
                          and --icc/--sd/--variance describe the spread inside one lab and arm (the
                          labs' own variance cancels when every lab runs every arm). Power then comes
                          from the noncentral t with L − 1 df and variance
                          (2·V_lab×arm + 2(σ²_unit + σ²_resid/M)/K)/L (Raudenbush & Liu 2000 with a
                          unit level); --units and --obs are per lab and arm.
  --lab-arm-variance V    how much labs differ in their response: the lab × condition variance
                          (the effect's SD between labs is √(2V)). Default with --from: the analysis's
                          <lab>:<condition> component; without it (e.g. engine 0.1) 0, which is
                          optimistic, and inputs.labArmVarianceSource says "unknown"
  --cost-lab C            cost of one more lab (default 0), for the cheapest design
  --one-arm-per-lab       each lab runs one arm (L labs per arm, df 2(L − 1)) instead of every arm
  --lab-variance V        with --one-arm-per-lab: variance between labs' means within an arm

Options:
  --alpha A               two-sided significance level (default 0.05; Bonferroni-split for more than 2 arms)
  --power P               target power (default 0.8)
  --arms N                number of conditions (default 2)
  --max-units K           limit on units per arm (per lab and arm with --labs) for the cheapest design
  --max-obs M             limit on observations per unit for the cheapest design
  -h, --help              show this help

Exit codes: 0 success; 2 bad input (one line on stderr); 1 internal error.
Examples:
  npm run --silent nestwise -- plan --difference 5 --icc 0.1 --sd 25 --obs 50 --cost-unit 400 --cost-obs 2
  npm run --silent nestwise -- plan --difference 8 --icc 0.17 --sd 11 --labs 2-12 --lab-arm-variance 2 \
    --cost-lab 2000 --cost-unit 100 --cost-obs 1`

function number(
  name: string,
  raw: string | undefined,
  check: (v: number) => boolean,
  rule: string,
): number | null {
  if (raw === undefined) return null
  const value = Number(raw)
  if (raw.trim() === '' || !Number.isFinite(value) || !check(value))
    throw new CliInputError(`--${name} must be ${rule}, got "${raw}".`)
  return value
}

function list(
  name: string,
  raw: string | undefined,
  check: (v: number) => boolean,
  rule: string,
): number[] | null {
  if (raw === undefined) return null
  return raw.split(',').map((part) => number(name, part, check, rule)!)
}

const positive = (v: number) => v > 0
const nonNegative = (v: number) => v >= 0
const wholeAtLeast = (min: number) => (v: number) => Number.isInteger(v) && v >= min

/** "4" → 4 to 4; "2-12" → 2 to 12 (whole numbers from 1 to 1000, smallest first). */
function labRange(raw: string | undefined): { min: number; max: number } | null {
  if (raw === undefined) return null
  const match = /^\s*(\d+)\s*(?:(?:-|\.\.)\s*(\d+)\s*)?$/.exec(raw)
  const min = match ? Number(match[1]) : Number.NaN
  const max = match?.[2] !== undefined ? Number(match[2]) : min
  if (!match || min < 1 || max < min || max > 1000)
    throw new CliInputError(
      `--labs must be a whole number from 1 to 1000, or a range like 2-12, got "${raw}".`,
    )
  return { min, max }
}

/** Parses the arguments after "plan"; null means help was asked for. */
export function parsePlanArgs(argv: string[]): PlanArgs | null {
  const option = { type: 'string' } as const
  let values
  try {
    ;({ values } = parseArgs({
      args: argv,
      allowPositionals: false,
      strict: true,
      options: {
        from: option,
        icc: option,
        sd: option,
        variance: option,
        difference: option,
        alpha: option,
        power: option,
        arms: option,
        units: option,
        obs: option,
        'cost-unit': option,
        'cost-obs': option,
        'max-units': option,
        'max-obs': option,
        'grid-units': option,
        'grid-obs': option,
        labs: option,
        'cost-lab': option,
        'lab-arm-variance': option,
        'one-arm-per-lab': { type: 'boolean' },
        'lab-variance': option,
        help: { type: 'boolean', short: 'h' },
      },
    }))
  } catch (error) {
    throw new CliInputError(`${(error as Error).message.split('\n')[0]} Run "nestwise plan --help".`)
  }
  if (values.help) return null

  const args: PlanArgs = {
    from: values.from ?? null,
    icc: number('icc', values.icc, (v) => v >= 0 && v <= 1, 'a number from 0 to 1'),
    sd: number('sd', values.sd, positive, 'a positive number'),
    variance: number('variance', values.variance, positive, 'a positive number'),
    difference: 0,
    alpha: number('alpha', values.alpha, (v) => v > 0 && v < 1, 'between 0 and 1') ?? 0.05,
    power: number('power', values.power, (v) => v > 0 && v < 1, 'between 0 and 1') ?? 0.8,
    arms: number('arms', values.arms, wholeAtLeast(2), 'a whole number of at least 2') ?? 2,
    units: number('units', values.units, wholeAtLeast(2), 'a whole number of at least 2'),
    obs: number('obs', values.obs, wholeAtLeast(1), 'a whole number of at least 1'),
    costUnit: number('cost-unit', values['cost-unit'], nonNegative, 'a number of at least 0'),
    costObs: number('cost-obs', values['cost-obs'], nonNegative, 'a number of at least 0'),
    maxUnits: number('max-units', values['max-units'], wholeAtLeast(2), 'a whole number of at least 2'),
    maxObs: number('max-obs', values['max-obs'], wholeAtLeast(1), 'a whole number of at least 1'),
    gridUnits: list('grid-units', values['grid-units'], wholeAtLeast(2), 'whole numbers of at least 2'),
    gridObs: list('grid-obs', values['grid-obs'], wholeAtLeast(1), 'whole numbers of at least 1'),
    labs: labRange(values.labs),
    costLab: number('cost-lab', values['cost-lab'], nonNegative, 'a number of at least 0'),
    labArmVariance: number(
      'lab-arm-variance',
      values['lab-arm-variance'],
      nonNegative,
      'a number of at least 0',
    ),
    oneArmPerLab: values['one-arm-per-lab'] ?? false,
    labVariance: number('lab-variance', values['lab-variance'], nonNegative, 'a number of at least 0'),
  }
  const difference = number('difference', values.difference, (v) => v !== 0, 'a non-zero number')
  if (difference === null)
    throw new CliInputError(
      'Missing --difference D (the smallest difference between arm means worth detecting).',
    )
  args.difference = difference
  if (args.sd !== null && args.variance !== null)
    throw new CliInputError('Give --sd or --variance, not both.')
  if (args.from === null && args.icc === null)
    throw new CliInputError('Missing --icc R (or --from RESULT.json to take it from an analysis).')
  if (args.from === null && args.sd === null && args.variance === null) {
    throw new CliInputError(
      'Missing --sd S or --variance V (or --from RESULT.json to take it from an analysis).',
    )
  }
  if (args.units !== null && args.obs === null)
    throw new CliInputError('--units K needs --obs M (observations per unit) to compute power.')
  if ((args.costUnit === null) !== (args.costObs === null))
    throw new CliInputError('--cost-unit and --cost-obs go together.')
  if ((args.gridUnits === null) !== (args.gridObs === null))
    throw new CliInputError('--grid-units and --grid-obs go together.')
  if ((args.maxUnits !== null || args.maxObs !== null) && args.costUnit === null) {
    throw new CliInputError(
      '--max-units and --max-obs limit the cheapest design; add --cost-unit and --cost-obs.',
    )
  }
  if (args.labs === null) {
    for (const [given, name] of [
      [args.costLab !== null, '--cost-lab'],
      [args.labArmVariance !== null, '--lab-arm-variance'],
      [args.oneArmPerLab, '--one-arm-per-lab'],
      [args.labVariance !== null, '--lab-variance'],
    ] as const) {
      if (given) throw new CliInputError(`${name} needs --labs L (or a range L1-L2).`)
    }
  } else {
    const range = args.labs.min !== args.labs.max
    if (range && (args.units !== null || args.gridUnits !== null))
      throw new CliInputError(
        '--labs L1-L2 is a range for the cheapest design; give one number of labs for --units/--obs or a grid.',
      )
    if (args.obs !== null && args.units === null)
      throw new CliInputError(
        'With --labs, give --units K and --obs M for the power of a design, or --cost-unit and --cost-obs for the cheapest one.',
      )
    if (args.labVariance !== null && !args.oneArmPerLab)
      throw new CliInputError(
        '--lab-variance goes with --one-arm-per-lab (with every lab running every arm it cancels).',
      )
    if (args.oneArmPerLab && args.labArmVariance !== null)
      throw new CliInputError(
        "With --one-arm-per-lab the lab × condition variance cannot be told apart from the labs' own: give --lab-variance only.",
      )
  }
  if (args.obs === null && args.costUnit === null && args.gridUnits === null) {
    throw new CliInputError(
      'Nothing to plan: give --units and --obs (power), --obs (units needed), --cost-unit and --cost-obs (cheapest design) or --grid-units and --grid-obs (power grid).',
    )
  }
  return args
}
