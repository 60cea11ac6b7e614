import { EngineInputError } from './engine-input-error'
import { clusterPower } from './cluster-power'
import { totalVariance, type TotalSpread } from './total-variance'

export interface PowerCurveInput extends TotalSpread {
  icc: number
  difference: number
  /** Two-sided family-wise significance level, default 0.05. */
  alpha?: number
  /** Number of arms, default 2; more than two uses the Bonferroni level as planDesign does. */
  arms?: number
  /** Units per arm to evaluate (each ≥ 2). */
  kValues: number[]
  /** Observations per unit to evaluate (each ≥ 1). */
  mValues: number[]
}

export interface PowerCurvePoint {
  unitsPerArm: number
  obsPerUnit: number
  power: number
}

export interface PowerCurveResult {
  kValues: number[]
  mValues: number[]
  /** power[i][j] is the power with kValues[i] units per arm and mValues[j] observations per unit. */
  power: number[][]
  /** The same grid as a flat list (convenient for charts). */
  points: PowerCurvePoint[]
  alphaPerComparison: number
}

/** Keeps one request from asking for an unbounded amount of work. */
const MAX_POINTS = 10_000

/**
 * Power over a grid of designs (units per arm × observations per unit), for charts that show
 * how adding units compares with adding observations per unit.
 *
 * Formula: each point is clusterPower (noncentral t with 2(k − 1) df, λ = √(k m / (2 deff)) ·
 * |δ| / σ_total, deff = 1 + (m − 1)ρ). With more than two arms each point is the power of one
 * pairwise comparison at α / (arms(arms − 1)/2) (Bonferroni), as in planDesign.
 *
 * Guard errors: empty or oversized grids (more than 10,000 points), k < 2, m < 1, and those of
 * clusterPower.
 *
 * @example
 * powerCurve({ icc: 0.1, variance: 5, difference: 1, kValues: [8, 16], mValues: [5, 10] })
 * // → { power: [[0.3503, 0.4804], [0.6381, 0.8018]], points: [{ unitsPerArm: 8, obsPerUnit: 5, power: 0.3503 }, …], … }
 */
export function powerCurve(input: PowerCurveInput): PowerCurveResult {
  const { kValues, mValues } = input ?? ({} as PowerCurveInput)
  if (!Array.isArray(kValues) || kValues.length === 0 || !Array.isArray(mValues) || mValues.length === 0) {
    throw new EngineInputError(
      'powerCurve requires at least one value of units per arm and one of observations per unit',
    )
  }
  if (kValues.length * mValues.length > MAX_POINTS) {
    throw new EngineInputError(
      `powerCurve: at most ${MAX_POINTS} grid points, got ${kValues.length * mValues.length}`,
    )
  }
  const arms = input.arms ?? 2
  if (!Number.isInteger(arms) || arms < 2) {
    throw new EngineInputError(`powerCurve requires a whole number of at least two arms, got ${arms}`)
  }
  const alpha = input.alpha ?? 0.05
  if (typeof alpha !== 'number' || !(alpha > 0 && alpha < 1)) {
    throw new EngineInputError(`powerCurve: alpha must be between 0 and 1, got ${alpha}`)
  }
  const alphaPerComparison = alpha / ((arms * (arms - 1)) / 2)
  const variance = totalVariance(input, 'powerCurve')
  const power = kValues.map((k) =>
    mValues.map(
      (m) =>
        clusterPower({
          unitsPerArm: k,
          obsPerUnit: m,
          difference: input.difference,
          variance,
          icc: input.icc,
          alpha: alphaPerComparison,
        }).power,
    ),
  )
  const points = kValues.flatMap((k, i) =>
    mValues.map((m, j) => ({ unitsPerArm: k, obsPerUnit: m, power: power[i][j] })),
  )
  return { kValues: [...kValues], mValues: [...mValues], power, points, alphaPerComparison }
}
