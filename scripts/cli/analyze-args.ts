import { parseArgs } from 'node:util'
import { CliInputError } from './cli-input-error'

export interface AnalyzeArgs {
  file: string
  response: string
  levels: string[]
  /** Condition factors: none, one, or two (fitted as A * B). */
  conditions: string[]
  covariates: string[]
  /** Reference level per condition factor; a factor left out uses its first label in the file. */
  reference: Record<string, string>
  bootstrap: { resamples: number; seed: string } | null
  /** The response's distribution: a measurement (default), yes/no or successes out of trials, or a count. */
  family: 'gaussian' | 'binomial' | 'poisson'
  /** Binomial only: the trials column (the response then holds the successes). */
  trials: string | undefined
  /** Binomial without trials: the response value counted as yes. */
  positive: string | undefined
  delimiter: string | undefined
  /** Undefined: as sniffed from the file, the way the web upload reads it. */
  decimal: '.' | ',' | undefined
}

export const ANALYZE_HELP = `Usage: nestwise analyze FILE --response COL --levels OUTER,INNER[,...] [options]

Fits the nested mixed model (REML) to one numeric column of a CSV/TSV file and prints one JSON
document on stdout: variance per level, ICC, design effect, effective n, naive and cluster-correct
means with CIs, and comparisons between conditions (adjusted for any covariates). A yes/no or count
response is fitted as a nested GLMM by the Laplace approximation (--family): odds or rate ratios with
Wald intervals, z and chi-square tests, variance shares on the latent scale.

Required:
  FILE                    CSV or TSV file with a header row (UTF-8, or UTF-16 with a byte-order mark)
  --response COL          the numeric column to analyse (NA, NaN or an empty cell = missing; the row is left out)
  --levels A,B[,C[,D]]    nesting levels, outermost first (e.g. lab,animal); labels are keyed by their full path

Options:
  --condition A[,B]       one or two condition columns (treatment, genotype, dose) to compare; two are
                          fitted as A * B
  --covariate X[,Y...]    numeric columns to adjust for (measured per observation or per unit, at most
                          4); a missing value leaves its row out
  --reference LEVEL       reference level of the one condition (default: its first value in the file)
  --reference A=LEVEL[,B=LEVEL]
                          reference level per condition column
  --family F              the response's distribution: gaussian (a measurement; default), binomial
                          (yes/no: two values such as positive/negative, or 0/1; logit link) or
                          poisson (counts: whole numbers of at least 0; log link)
  --positive VALUE        binomial: the response value counted as yes (default: 1 of a 0/1 column,
                          else a value reading as yes such as "yes", "positive" or "present", else
                          the second value in sorted order); the JSON names it under "outcome"
  --trials COL            binomial: the response holds successes out of the trials in COL (whole
                          numbers of at least 1), one row per unit or per unit and condition
  --bootstrap N           add a hierarchical bootstrap with N resamples (needs --seed; not with --trials)
  --seed S                seed of the bootstrap, so a result can be reproduced
  --delimiter C           field separator: ',' ';' or 'tab' (default: detected from the first rows)
  --decimal C             decimal mark of the response and covariates: '.' or ',' (default: detected,
                          as the web upload does: ',' when a ';' or tab table writes numbers with it)
The file is decoded as the web upload decodes it: UTF-8, UTF-16, or a legacy encoding such as
Windows-1252.
  -h, --help              show this help

Exit codes: 0 success; 2 bad input (one line on stderr naming the column, row or file); 1 internal error.
Example:
  npm run --silent nestwise -- analyze cells.csv --response neurite_length_um --levels lab,animal --condition treatment
  npm run --silent nestwise -- analyze cells.csv --response neurite_length_um --levels lab,animal \\
    --condition genotype,treatment --covariate soma_area_um2 --reference genotype=WT,treatment=vehicle
  npm run --silent nestwise -- analyze cells.csv --response marker --family binomial --positive positive \\
    --levels lab,animal --condition treatment`

/** At most this many condition factors and covariates (as in the app's settings). */
const MAX_CONDITIONS = 2
const MAX_COVARIATES = 4

/** Separators people type on a command line, mapped to the character. */
const DELIMITERS: Record<string, string> = {
  ',': ',',
  ';': ';',
  tab: '\t',
  '\\t': '\t',
  '\t': '\t',
  '|': '|',
}

/** Parses the arguments after "analyze"; null means help was asked for. */
export function parseAnalyzeArgs(argv: string[]): AnalyzeArgs | null {
  let parsed
  try {
    parsed = parseArgs({
      args: argv,
      allowPositionals: true,
      strict: true,
      options: {
        response: { type: 'string' },
        levels: { type: 'string' },
        condition: { type: 'string' },
        covariate: { type: 'string' },
        reference: { type: 'string' },
        family: { type: 'string' },
        trials: { type: 'string' },
        positive: { type: 'string' },
        bootstrap: { type: 'string' },
        seed: { type: 'string' },
        delimiter: { type: 'string' },
        decimal: { type: 'string' },
        help: { type: 'boolean', short: 'h' },
      },
    })
  } catch (error) {
    throw new CliInputError(`${(error as Error).message.split('\n')[0]} Run "nestwise analyze --help".`)
  }
  const { values, positionals } = parsed
  if (values.help) return null
  if (positionals.length === 0) throw new CliInputError('No input file given. Run "nestwise analyze --help".')
  if (positionals.length > 1)
    throw new CliInputError(`Expected one input file, got ${positionals.length}: ${positionals.join(' ')}.`)
  if (!values.response) throw new CliInputError('Missing --response COL (the numeric column to analyse).')
  if (!values.levels)
    throw new CliInputError('Missing --levels OUTER,INNER (the nesting levels, outermost first).')
  const levels = values.levels.split(',').map((name) => name.trim())
  if (levels.some((name) => name === ''))
    throw new CliInputError(`--levels has an empty name: "${values.levels}".`)
  if (levels.length > 4)
    throw new CliInputError(`--levels takes 1 to 4 nesting levels, got ${levels.length}.`)

  let delimiter: string | undefined
  if (values.delimiter !== undefined) {
    delimiter = DELIMITERS[values.delimiter]
    if (!delimiter)
      throw new CliInputError(`--delimiter must be ',', ';', '|' or 'tab', got "${values.delimiter}".`)
  }
  const decimal = values.decimal
  if (decimal !== undefined && decimal !== '.' && decimal !== ',')
    throw new CliInputError(`--decimal must be '.' or ',', got "${decimal}".`)
  if (decimal === ',' && delimiter === ',')
    throw new CliInputError('--decimal "," cannot be combined with --delimiter ","; use ";" or tab.')

  let bootstrap: AnalyzeArgs['bootstrap'] = null
  if (values.bootstrap !== undefined) {
    const resamples = Number(values.bootstrap)
    if (!Number.isInteger(resamples) || resamples < 100 || resamples > 100_000) {
      throw new CliInputError(
        `--bootstrap must be a whole number of resamples from 100 to 100000, got "${values.bootstrap}".`,
      )
    }
    if (values.seed === undefined || values.seed === '')
      throw new CliInputError('--bootstrap needs --seed S so the result can be reproduced.')
    bootstrap = { resamples, seed: values.seed }
  } else if (values.seed !== undefined) {
    throw new CliInputError('--seed only applies together with --bootstrap N.')
  }

  const { family, trials, positive } = familyOptions(values)
  if (trials !== undefined && bootstrap)
    throw new CliInputError(
      '--bootstrap resamples single observations, so it does not apply to successes out of --trials.',
    )

  const conditions = columnList('--condition', values.condition, MAX_CONDITIONS)
  const covariates = columnList('--covariate', values.covariate, MAX_COVARIATES)
  return {
    file: positionals[0],
    response: values.response.trim(),
    levels,
    conditions,
    covariates,
    reference: referenceLevels(values.reference, conditions),
    bootstrap,
    family,
    trials,
    positive,
    delimiter,
    decimal,
  }
}

const FAMILIES = ['gaussian', 'binomial', 'poisson'] as const

/** --family, and --trials and --positive, which only a binomial response takes. */
function familyOptions(values: { family?: string; trials?: string; positive?: string }) {
  const family = (values.family ?? 'gaussian').trim()
  if (!(FAMILIES as readonly string[]).includes(family))
    throw new CliInputError(`--family must be gaussian, binomial or poisson, got "${values.family}".`)
  const trials = values.trials?.trim()
  if (trials !== undefined && trials === '') throw new CliInputError('--trials needs a column name.')
  if (trials !== undefined && family !== 'binomial')
    throw new CliInputError('--trials COL needs --family binomial (successes out of trials).')
  if (values.positive !== undefined && family !== 'binomial')
    throw new CliInputError('--positive VALUE needs --family binomial (a yes/no response).')
  if (values.positive !== undefined && trials !== undefined)
    throw new CliInputError('--positive does not apply with --trials: the response then holds successes.')
  return { family: family as (typeof FAMILIES)[number], trials, positive: values.positive?.trim() }
}

/** A comma-separated list of column names (empty when the option is absent). */
function columnList(option: string, text: string | undefined, max: number): string[] {
  if (text === undefined) return []
  const names = text.split(',').map((name) => name.trim())
  if (names.some((name) => name === ''))
    throw new CliInputError(`${option} has an empty column name: "${text}".`)
  if (names.length > max)
    throw new CliInputError(`${option} takes at most ${max} columns, got ${names.length}.`)
  return names
}

/**
 * "--reference LEVEL" for the one condition, or "--reference A=LEVEL[,B=LEVEL]" per condition
 * column. A value that starts with a condition's name and "=" is read as the second form.
 */
function referenceLevels(text: string | undefined, conditions: string[]): Record<string, string> {
  if (text === undefined) return {}
  if (!conditions.length) throw new CliInputError('--reference needs --condition COL.')
  const perFactor = conditions.some((name) => text.startsWith(`${name}=`))
  if (!perFactor) {
    if (conditions.length > 1)
      throw new CliInputError(
        `--reference "${text}" does not say which condition it is for; use --reference ${conditions[0]}=LEVEL,${conditions[1]}=LEVEL.`,
      )
    return { [conditions[0]]: text }
  }
  const reference: Record<string, string> = {}
  for (const part of text.split(',')) {
    const at = part.indexOf('=')
    const factor = at < 0 ? '' : part.slice(0, at).trim()
    if (!conditions.includes(factor))
      throw new CliInputError(
        `--reference "${part}" must be FACTOR=LEVEL with FACTOR one of the conditions (${conditions.join(', ')}).`,
      )
    if (factor in reference) throw new CliInputError(`--reference names "${factor}" twice.`)
    reference[factor] = part.slice(at + 1)
  }
  return reference
}
