import { EngineInputError } from '../stats/engine-input-error'
import type { NestedColumns } from '../stats/types'

/**
 * Refuses a response the family cannot take, naming the first offending row (1-based, as the
 * columns hold them): binomial values other than 0 and 1 (or successes outside 0 … trials, or
 * trials that are not whole numbers of at least 1), Poisson values that are negative or not
 * whole. Missing values pass: the design leaves those rows out and counts them.
 */
export function checkGlmmResponse(columns: NestedColumns): void {
  const { response, responseName, family } = columns
  const trials = columns.trials ?? null
  const whole = (v: number) => Number.isInteger(v)
  for (let r = 0; r < response.length; r++) {
    const y = response[r]
    if (y !== y) continue
    if (family === 'poisson') {
      if (!(y >= 0 && whole(y)))
        throw new EngineInputError(
          `Row ${r + 1} of "${responseName}" holds ${y}, not a count (a whole number of at least 0).`,
          responseName,
        )
      continue
    }
    if (!trials) {
      if (y !== 0 && y !== 1)
        throw new EngineInputError(
          `Row ${r + 1} of "${responseName}" holds ${y}; a yes/no response must be 0 or 1.`,
          responseName,
        )
      continue
    }
    const n = trials[r]
    if (n !== n) continue
    if (!(n >= 1 && whole(n)))
      throw new EngineInputError(
        `Row ${r + 1} has ${n} trials; trials must be whole numbers of at least 1.`,
        responseName,
      )
    if (!(y >= 0 && y <= n && whole(y)))
      throw new EngineInputError(
        `Row ${r + 1} has ${y} successes out of ${n} trials; successes must be whole numbers from 0 to the trials.`,
        responseName,
      )
  }
}
