import { EngineInputError } from './engine-input-error'
import { checkThreeLevelVariances } from './planning/check-three-level-variances'
import type { LabDesign } from './three-level-variance'

export interface CostOptimalUnitsPerLabInput {
  /** Default 'every-arm' (every lab runs every arm). */
  design?: LabDesign
  /** Number of arms, default 2. */
  arms?: number
  /** Cost of one more lab (set-up, travel, shipping), any currency or effort scale. */
  costPerLab: number
  /** Cost of one unit (animal), same scale. */
  costPerUnit: number
  /** Cost of one observation (cell), same scale. */
  costPerObs: number
  /** Observations per unit m the units are planned with (e.g. the cost-optimal m*). */
  obsPerUnit: number
  labArmVariance: number
  unitVariance: number
  residualVariance: number
  /** σ²_lab, used by 'one-arm' only (default 0). */
  labVariance?: number
}

export interface CostOptimalUnitsPerLabResult {
  /** k* before rounding; Infinity when there is no finite optimum. */
  exact: number
  /** The better whole number next to k* (at least 1); null when there is no finite optimum. */
  unitsPerLabArm: number | null
  /** Plain-language explanation of an edge case, else null. */
  note: string | null
}

/**
 * Cost-optimal number of units per lab and arm: for a fixed budget, the k that makes the
 * difference between two arms most precise (equivalently, reaches a given precision at the lowest
 * cost) when a lab costs c_lab, a unit c_unit and an observation c_obs, with m observations per unit.
 *
 * Formula: with w = σ²_unit + σ²_resid/m and c₁ = c_unit + m·c_obs, the variance × cost per lab is
 *   every lab runs all A arms:  (c_lab + A·k·c₁) · (2σ²_lab×arm + 2w/k),
 *   each lab runs one arm:      (c_lab + k·c₁) · (σ²_lab + σ²_lab×arm + w/k),
 * both of the form (a + b·k)(c + d/k), minimised at k* = √(a·d / (b·c)):
 *   k* = √(c_lab · w / (A · c₁ · σ²_lab×arm))   or   √(c_lab · w / (c₁ · (σ²_lab + σ²_lab×arm))).
 * For two arms the first is Raudenbush & Liu's (2000, Psychol Methods 5:199) optimal number of
 * persons per site n* = 2√(C·σ²/(c·τ)) (from memory) with n = 2k, τ = 2σ²_lab×arm and a person
 * replaced by a unit of m observations. The number of labs does not enter: it is then set by the
 * power wanted. The optimal m inside a unit does not depend on the labs either
 * (costOptimalObsPerUnit; Moerbeek, van Breukelen & Berger 2000, J Educ Behav Stat 25:271, from
 * memory): minimising over k first leaves (√(a·c) + √(b·d))², whose m-dependent part (c₁·w) is
 * smallest at m* = √((c_unit/c_obs)·σ²_resid/σ²_unit).
 * The whole-number recommendation is whichever of ⌊k*⌋ and ⌈k*⌉ (at least 1) gives the smaller
 * criterion.
 *
 * Edge cases: no lab-level variance, or units and observations that cost nothing → no finite
 * optimum (Infinity); labs that cost nothing, or no variance inside the lab → one unit per lab and arm.
 *
 * Guard errors: a negative or non-finite cost; all costs 0; m < 1; a negative or non-finite
 * variance; arms not a whole number ≥ 2; an unknown design.
 *
 * @example
 * costOptimalUnitsPerLab({ costPerLab: 2000, costPerUnit: 100, costPerObs: 1, obsPerUnit: 20, labArmVariance: 2, unitVariance: 20, residualVariance: 100 })
 * // → { exact: 10.2062, unitsPerLabArm: 10, note: null }   (√(2000 · 25 / (2 · 120 · 2)) = √104.17)
 */
export function costOptimalUnitsPerLab(input: CostOptimalUnitsPerLabInput): CostOptimalUnitsPerLabResult {
  const design = input?.design ?? 'every-arm'
  const arms = input?.arms ?? 2
  if (design !== 'every-arm' && design !== 'one-arm') {
    throw new EngineInputError(`costOptimalUnitsPerLab: unknown design "${String(design)}"`)
  }
  if (!Number.isInteger(arms) || arms < 2) {
    throw new EngineInputError(
      `costOptimalUnitsPerLab requires a whole number of at least two arms, got ${arms}`,
    )
  }
  const { costPerLab, costPerUnit, costPerObs, obsPerUnit: m } = input
  for (const [name, value] of [
    ['costPerLab', costPerLab],
    ['costPerUnit', costPerUnit],
    ['costPerObs', costPerObs],
  ] as const) {
    if (typeof value !== 'number' || !Number.isFinite(value) || value < 0) {
      throw new EngineInputError(
        `costOptimalUnitsPerLab: ${name} must be a non-negative number, got ${value}`,
      )
    }
  }
  if (costPerLab === 0 && costPerUnit === 0 && costPerObs === 0) {
    throw new EngineInputError('costOptimalUnitsPerLab requires at least one non-zero cost')
  }
  if (typeof m !== 'number' || !Number.isFinite(m) || m < 1) {
    throw new EngineInputError(`costOptimalUnitsPerLab requires at least one observation per unit, got ${m}`)
  }
  const { labArmVariance, labVariance, unitVariance, residualVariance } = checkThreeLevelVariances(
    input,
    'costOptimalUnitsPerLab',
  )
  const armsPerLab = design === 'every-arm' ? arms : 1
  const between = design === 'every-arm' ? labArmVariance : labVariance + labArmVariance
  const within = unitVariance + residualVariance / m
  const perUnit = costPerUnit + m * costPerObs

  if (between === 0 || perUnit === 0) {
    return {
      exact: Infinity,
      unitsPerLabArm: null,
      note:
        between === 0
          ? 'Labs are taken not to differ, so a unit in a lab already running is as informative as one in a new lab: there is no finite optimum, and the number of labs is set by the degrees of freedom the test needs.'
          : 'Units and observations cost nothing, so there is no finite optimum: put as many units in each lab as practical.',
    }
  }
  if (costPerLab === 0 || within === 0) {
    return {
      exact: 0,
      unitsPerLabArm: 1,
      note:
        costPerLab === 0
          ? 'A new lab costs nothing beyond its units: one unit per lab and arm, spread over as many labs as needed, is the most efficient design.'
          : 'Units within a lab do not differ, so one unit per lab and arm is enough.',
    }
  }
  const exact = Math.sqrt((costPerLab * within) / (armsPerLab * perUnit * between))
  const criterion = (k: number) => (costPerLab + armsPerLab * k * perUnit) * (between + within / k)
  const below = Math.max(1, Math.floor(exact))
  const above = Math.max(1, Math.ceil(exact))
  return { exact, unitsPerLabArm: criterion(above) < criterion(below) ? above : below, note: null }
}
