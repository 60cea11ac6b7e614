import { EngineInputError } from '../engine-input-error'
import { threeLevelPower } from '../three-level-power'
import type { LabDesign, ThreeLevelVariances } from '../three-level-variance'

/** What both design searches (planFewestUnits, planThreeLevel) take besides their costs. */
export interface PlanSearchInput extends ThreeLevelVariances {
  /** Default 'every-arm': every lab runs every arm. 'one-arm': each lab runs one arm (L labs per arm). */
  design?: LabDesign
  /** Smallest difference between two arm means worth detecting, δ. */
  difference: number
  /** Two-sided family-wise significance level, default 0.05. */
  alpha?: number
  /** Target power of each pairwise comparison, default 0.8. */
  power?: number
  /** Number of arms, default 2. */
  arms?: number
  /** Fewest and most labs (labs per arm for 'one-arm') to consider; equal for a fixed number. */
  minLabs: number
  maxLabs: number
  /** Upper limit on units per lab and arm. */
  maxUnitsPerLabArm?: number
  /** Upper limit on observations per unit. */
  maxObsPerUnit?: number
  /** The outer level's name in the error messages, singular and plural; default "lab", "labs". */
  labWords?: { one: string; many: string }
}

/** The input with its defaults filled in, checked, and what follows from it for the search. */
export interface CheckedPlanSearch {
  design: LabDesign
  arms: number
  alpha: number
  /** The target power. */
  target: number
  /** α / (number of pairs) for more than two arms (Bonferroni), else α. */
  alphaPerComparison: number
  variances: Required<ThreeLevelVariances>
  difference: number
  /** σ²_unit + σ²_resid, above 0. */
  within: number
  minLabs: number
  maxLabs: number
  maxUnitsPerLabArm: number | undefined
  maxObsPerUnit: number | undefined
  /** The fewest labs the search tries: 2 where one lab cannot be told apart from the effect. */
  firstLabs: number
}

const MAX_LABS = 1000

/**
 * Checks the input both design searches share and fills in its defaults; `caller` names the
 * public function in every message, so the person reads which planner refused what.
 *
 * Guard errors: arms not a whole number ≥ 2; α outside (0, 1); target power outside (α, 1); labs
 * not whole, min > max, more than 1000; limits that are not whole numbers ≥ 1; those of
 * threeLevelPower (variances, difference); no spread inside the labs; no allowed number of labs
 * (one lab with a lab × arm variance above 0, fewer than 2 labs per arm when each runs one arm);
 * one lab with at most one unit per arm.
 */
export function checkPlanSearchInput(input: PlanSearchInput, caller: string): CheckedPlanSearch {
  const design = input?.design ?? 'every-arm'
  const arms = input?.arms ?? 2
  if (!Number.isInteger(arms) || arms < 2) {
    throw new EngineInputError(`${caller} requires a whole number of at least two arms, got ${arms}`)
  }
  const alpha = input.alpha ?? 0.05
  const target = input.power ?? 0.8
  if (typeof alpha !== 'number' || !(alpha > 0 && alpha < 1)) {
    throw new EngineInputError(`${caller}: alpha must be between 0 and 1, got ${alpha}`)
  }
  if (typeof target !== 'number' || !(target > alpha && target < 1)) {
    throw new EngineInputError(
      `${caller}: the target power must be between alpha (${alpha}) and 1, got ${target}`,
    )
  }
  const { minLabs, maxLabs, maxUnitsPerLabArm, maxObsPerUnit } = input
  if (
    !Number.isInteger(minLabs) ||
    !Number.isInteger(maxLabs) ||
    minLabs < 1 ||
    maxLabs < minLabs ||
    maxLabs > MAX_LABS
  ) {
    throw new EngineInputError(
      `${caller}: labs must be whole numbers from 1 to ${MAX_LABS} with the smallest first, got ${minLabs} to ${maxLabs}`,
    )
  }
  for (const [name, limit] of [
    ['maxUnitsPerLabArm', maxUnitsPerLabArm],
    ['maxObsPerUnit', maxObsPerUnit],
  ] as const) {
    if (limit !== undefined && !(Number.isInteger(limit) && limit >= 1)) {
      throw new EngineInputError(`${caller}: ${name} must be a whole number of at least 1, got ${limit}`)
    }
  }
  const { labArmVariance, unitVariance, residualVariance, difference } = input
  const variances = { labArmVariance, unitVariance, residualVariance, labVariance: input.labVariance ?? 0 }
  const alphaPerComparison = alpha / ((arms * (arms - 1)) / 2)
  // Validates the variances, the difference and α (one lab only when it is allowed).
  threeLevelPower({
    design,
    labs: design === 'one-arm' || labArmVariance > 0 ? 2 : 1,
    unitsPerLabArm: 2,
    obsPerUnit: 1,
    ...variances,
    difference,
    alpha: alphaPerComparison,
  })
  const within = unitVariance + residualVariance
  if (!(within > 0)) {
    throw new EngineInputError(
      `${caller} needs some spread inside the labs (between units or between observations)`,
    )
  }
  const word = input.labWords ?? { one: 'lab', many: 'labs' }
  const oneLabAllowed = design === 'every-arm' && labArmVariance === 0
  const firstLabs = Math.max(minLabs, oneLabAllowed ? 1 : 2)
  if (firstLabs > maxLabs) {
    throw new EngineInputError(
      design === 'one-arm'
        ? `${caller}: with each ${word.one} running one arm, at least 2 ${word.many} per arm are needed`
        : `${caller}: with one ${word.one}, how much ${word.many} differ in their response cannot be told apart from the effect; allow at least 2 ${word.many}, or set the ${word.one} × condition variance to 0 to plan for one ${word.one} alone`,
    )
  }
  if (firstLabs === 1 && maxLabs === 1 && maxUnitsPerLabArm === 1) {
    throw new EngineInputError(`${caller}: with one lab, at least 2 units per arm are needed`)
  }
  return {
    design,
    arms,
    alpha,
    target,
    alphaPerComparison,
    variances,
    difference,
    within,
    minLabs,
    maxLabs,
    maxUnitsPerLabArm,
    maxObsPerUnit,
    firstLabs,
  }
}
