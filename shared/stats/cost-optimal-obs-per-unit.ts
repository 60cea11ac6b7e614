import { EngineInputError } from './engine-input-error'

export interface CostOptimalInput {
  /** Cost of adding one unit (e.g. one animal), in any currency or effort unit. */
  costPerUnit: number
  /** Cost of one more observation inside a unit (e.g. one more cell imaged), same unit as costPerUnit. */
  costPerObs: number
  /** Intraclass correlation ρ of the units, between 0 and 1. */
  icc: number
}

export interface CostOptimalResult {
  /** m* = √((c_unit / c_obs) · (1 − ρ) / ρ); Infinity when there is no finite optimum. */
  exact: number
  /**
   * The better whole number next to m* (at least 1) by the cost × variance criterion below;
   * null when there is no finite optimum.
   */
  obsPerUnit: number | null
  /** Plain-language explanation for the edge cases (ρ = 0, ρ = 1, free units or observations), else null. */
  note: string | null
}

/**
 * Cost-optimal number of observations per unit: for a fixed budget, the m that gives the most
 * precise mean (equivalently, reaches a given precision at the lowest cost) when each unit costs
 * c_unit and each observation c_obs.
 *
 * Formula: the variance of a mean per unit of budget is proportional to
 *   (c_unit + m · c_obs) · (1 + (m − 1)ρ) / m,
 * minimised at m* = √((c_unit / c_obs) · (1 − ρ) / ρ) (classic cluster-sampling result; see
 * Raudenbush 1997, Psychol Methods 2:173). The whole-number recommendation is whichever of
 * ⌊m*⌋ and ⌈m*⌉ (at least 1) gives the smaller criterion.
 *
 * Edge cases: ρ = 0 or c_obs = 0 → no finite optimum (more observations are always worth it);
 * ρ = 1 or c_unit = 0 → one observation per unit.
 *
 * Guard errors: a negative or non-finite cost, both costs zero, ρ outside [0, 1].
 *
 * @example
 * costOptimalObsPerUnit({ costPerUnit: 100, costPerObs: 1, icc: 0.1 }) // → { exact: 30, obsPerUnit: 30, note: null }
 */
export function costOptimalObsPerUnit(input: CostOptimalInput): CostOptimalResult {
  const { costPerUnit, costPerObs, icc } = input ?? ({} as CostOptimalInput)
  for (const [name, value] of [
    ['costPerUnit', costPerUnit],
    ['costPerObs', costPerObs],
  ] as const) {
    if (typeof value !== 'number' || !Number.isFinite(value) || value < 0) {
      throw new EngineInputError(`costOptimalObsPerUnit: ${name} must be a non-negative number, got ${value}`)
    }
  }
  if (costPerUnit === 0 && costPerObs === 0) {
    throw new EngineInputError('costOptimalObsPerUnit requires at least one non-zero cost')
  }
  if (typeof icc !== 'number' || !(icc >= 0 && icc <= 1)) {
    throw new EngineInputError(`costOptimalObsPerUnit: icc must be between 0 and 1, got ${icc}`)
  }
  if (icc === 0 || costPerObs === 0) {
    return {
      exact: Infinity,
      obsPerUnit: null,
      note:
        icc === 0
          ? 'With an ICC of 0, observations in the same unit are as informative as observations in new units, so there is no finite optimum: take as many observations per unit as practical.'
          : 'Extra observations cost nothing, so there is no finite optimum: take as many observations per unit as practical.',
    }
  }
  if (icc === 1 || costPerUnit === 0) {
    return {
      exact: 0,
      obsPerUnit: 1,
      note:
        icc === 1
          ? 'With an ICC of 1, every observation in a unit repeats the same information: one observation per unit is enough.'
          : 'New units cost nothing, so one observation per unit is the most efficient design.',
    }
  }
  const exact = Math.sqrt((costPerUnit / costPerObs) * ((1 - icc) / icc))
  const criterion = (m: number) => ((costPerUnit + m * costPerObs) * (1 + (m - 1) * icc)) / m
  const below = Math.max(1, Math.floor(exact))
  const above = Math.max(1, Math.ceil(exact))
  return { exact, obsPerUnit: criterion(above) < criterion(below) ? above : below, note: null }
}
