import { EngineInputError } from './engine-input-error'

/** Either the total SD or the total variance of one observation (unit + residual parts). */
export interface TotalSpread {
  /** Total standard deviation σ_total of one observation. */
  sdTotal?: number
  /** Total variance σ_total² of one observation; give this or `sdTotal`, not both. */
  variance?: number
}

/**
 * The total variance σ_total² of one observation, from whichever of `sdTotal` or `variance`
 * the caller gave; shared by the planning functions.
 *
 * Guard errors: neither or both given, or a value that is not a positive finite number.
 * `caller` names the public function in the message.
 *
 * @example
 * totalVariance({ sdTotal: 2 }, 'clusterPower') // → 4
 * totalVariance({ variance: 5 }, 'clusterPower') // → 5
 */
export function totalVariance(spread: TotalSpread, caller: string): number {
  const hasSd = spread?.sdTotal !== undefined
  const hasVariance = spread?.variance !== undefined
  if (hasSd === hasVariance) {
    throw new EngineInputError(`${caller} requires exactly one of sdTotal or variance`)
  }
  const value = hasSd ? spread.sdTotal : spread.variance
  if (typeof value !== 'number' || !Number.isFinite(value) || value <= 0) {
    throw new EngineInputError(
      `${caller}: ${hasSd ? 'sdTotal' : 'variance'} must be a positive number, got ${value}`,
    )
  }
  return hasSd ? value * value : value
}
