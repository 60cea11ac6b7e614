import { EngineInputError } from './engine-input-error'

/**
 * Effective number of observations: how many independent observations would carry the same
 * information about a mean as `nObs` clustered ones.
 *
 * Formula: n_eff = N / deff (Kish 1965, Survey Sampling).
 *
 * Guard errors: N not a positive finite number, deff not a positive finite number.
 *
 * @example
 * effectiveN(1000, 12.7) // → 78.74
 */
export function effectiveN(nObs: number, deff: number): number {
  if (typeof nObs !== 'number' || !Number.isFinite(nObs) || nObs <= 0) {
    throw new EngineInputError(`effectiveN: the number of observations must be positive, got ${nObs}`)
  }
  if (typeof deff !== 'number' || !Number.isFinite(deff) || deff <= 0) {
    throw new EngineInputError(`effectiveN: the design effect must be a positive number, got ${deff}`)
  }
  return nObs / deff
}
