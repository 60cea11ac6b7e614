import { parseArgs } from 'node:util'
import { CliInputError } from './cli-input-error'

export interface AnalyzeArgs {
  file: string
  response: string
  levels: string[]
  condition: string | null
  reference: string | null
  bootstrap: { resamples: number; seed: string } | null
  delimiter: string | undefined
  decimal: '.' | ','
}

export const ANALYZE_HELP = `Usage: nestwise analyze FILE --response COL --levels OUTER,INNER[,...] [options]

Fits the nested random-intercept model (REML) to one numeric column of a CSV/TSV file and prints
one JSON document on stdout: variance per level, ICC, design effect, effective n, naive and
cluster-correct means with CIs, and comparisons between conditions.

Required:
  FILE                    CSV or TSV file with a header row (UTF-8, or UTF-16 with a byte-order mark)
  --response COL          the numeric column to analyse (NA, NaN or an empty cell = missing; the row is left out)
  --levels A,B[,C[,D]]    nesting levels, outermost first (e.g. lab,animal); labels are keyed by their full path

Options:
  --condition COL         fixed-effect column (treatment, genotype, dose) to compare
  --reference LEVEL       reference condition for the model coding (default: first in the file)
  --bootstrap N           add a hierarchical bootstrap with N resamples (needs --seed)
  --seed S                seed of the bootstrap, so a result can be reproduced
  --delimiter C           field separator: ',' ';' or 'tab' (default: detected from the first rows)
  --decimal C             decimal mark of the response: '.' (default) or ','
  -h, --help              show this help

Exit codes: 0 success; 2 bad input (one line on stderr naming the column, row or file); 1 internal error.
Example:
  npm run --silent nestwise -- analyze cells.csv --response neurite_length_um --levels lab,animal --condition treatment`

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
        reference: { type: 'string' },
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
  const decimal = values.decimal ?? '.'
  if (decimal !== '.' && decimal !== ',')
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

  if (values.condition !== undefined && values.condition.trim() === '')
    throw new CliInputError('--condition needs a column name.')
  if (values.reference !== undefined && values.condition === undefined)
    throw new CliInputError('--reference needs --condition COL.')

  return {
    file: positionals[0],
    response: values.response.trim(),
    levels,
    condition: values.condition?.trim() ?? null,
    reference: values.reference ?? null,
    bootstrap,
    delimiter,
    decimal,
  }
}
