import { EngineInputError } from './engine-input-error'
import { fewestLabsFor } from './planning/fewest-labs-for'
import { threeLevelPower } from './three-level-power'
import type { LabDesign, ThreeLevelVariances } from './three-level-variance'
import { twoSidedTPower } from './two-sided-t-power'

export interface PlanFewestUnitsInput extends ThreeLevelVariances {
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
  /** Upper limit on observations per unit; default 100 (see below). */
  maxObsPerUnit?: number
  /** The outer level's name in the notes, singular and plural; default "lab", "labs". */
  labWords?: { one: string; many: string }
}

export interface PlanFewestUnitsResult {
  /** False when no design within the limits reaches the target power (a best effort is reported). */
  feasible: boolean
  design: LabDesign
  /** L: labs ('every-arm') or labs per arm ('one-arm'). */
  labs: number
  unitsPerLabArm: number
  obsPerUnit: number
  arms: number
  /** L for 'every-arm', arms · L for 'one-arm'. */
  totalLabs: number
  /** arms · L · k: the number this plan keeps as small as it can. */
  totalUnits: number
  totalObs: number
  /** Power of each pairwise comparison at `alphaPerComparison`. */
  achievedPower: number
  df: number
  /** α / (number of pairs) for more than two arms (Bonferroni), else α. */
  alphaPerComparison: number
  /** The most the recommended number of labs can reach, however many units and observations. */
  ceilingPower: number
  /** Fewest labs whose ceiling reaches the target power; null beyond 10 000. */
  fewestLabs: number | null
  /** Design effect 1 + (m − 1)ρ inside a unit, ρ = σ²_unit / (σ²_unit + σ²_resid). */
  deff: number
  searchedUpToObsPerUnit: number
  /** Plain-language remarks, possibly empty. */
  notes: string[]
}

/**
 * Without costs, observations per unit are searched up to this many. Common practice, no source:
 * past a few dozen observations a unit's mean is pinned down by the unit's own variance, and 100
 * cells, fields or wells per unit is beyond what most protocols measure. A limit replaces it.
 */
export const COUNTS_OBS_CAP = 100
const MAX_LABS = 1000
/** Units per lab and arm searched at most; past this the target is taken as out of reach. */
const UNITS_LIMIT = 1_000_000

/**
 * Design with the fewest independent units that reaches the target power, for a planner that has
 * no costs: the number of units in all (arms · L · k) is kept as small as the limits allow, ties
 * go to fewer labs, and the observations per unit are then the fewest that still reach the target
 * with those units. Units come first because they are what an experiment spends (animals, donors,
 * cultures: the "reduction" of Russell & Burch 1959, The Principles of Humane Experimental
 * Technique); observations inside a unit cost little by comparison, but add less and less (the
 * unit's own variance remains however many are measured).
 *
 * Model, test and degrees of freedom: threeLevelPower (Raudenbush & Liu 2000, Psychol Methods
 * 5:199, with a unit level; one lab: the two-level cluster test with 2(k − 1) df). Power rises
 * with k and with m, so each is found by doubling and bisection: for every L in the range the
 * smallest k that reaches the target at the largest m allowed, then, for the best L, the smallest
 * m that keeps that k. Labs are tried upwards and the search stops once arms · L alone exceeds the
 * best number of units so far.
 *
 * When nothing reaches the target: with a limit on units per lab, the most powerful design the
 * limits allow; without one (the lab-to-lab variance caps what the labs can reach), the fewest
 * units with the most labs allowed that come within 2 percentage points of that ceiling.
 *
 * Guard errors: those of threeLevelPower; arms not a whole number ≥ 2; labs not whole, min > max,
 * more than 1000, or no allowed number of labs; limits that are not whole numbers ≥ 1; no spread
 * inside the labs; target power outside (α, 1).
 *
 * @example
 * planFewestUnits({ labArmVariance: 0, unitVariance: 20, residualVariance: 100, difference: 8,
 *   minLabs: 1, maxLabs: 1 })
 * // → { feasible: true, labs: 1, unitsPerLabArm: 7, obsPerUnit: 25, totalUnits: 14, achievedPower: 0.8006, df: 12, … }
 */
export function planFewestUnits(input: PlanFewestUnitsInput): PlanFewestUnitsResult {
  const design = input?.design ?? 'every-arm'
  const arms = input?.arms ?? 2
  if (!Number.isInteger(arms) || arms < 2) {
    throw new EngineInputError(`planFewestUnits requires a whole number of at least two arms, got ${arms}`)
  }
  const alpha = input.alpha ?? 0.05
  const target = input.power ?? 0.8
  if (typeof alpha !== 'number' || !(alpha > 0 && alpha < 1)) {
    throw new EngineInputError(`planFewestUnits: alpha must be between 0 and 1, got ${alpha}`)
  }
  if (typeof target !== 'number' || !(target > alpha && target < 1)) {
    throw new EngineInputError(
      `planFewestUnits: the target power must be between alpha (${alpha}) and 1, got ${target}`,
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
      `planFewestUnits: labs must be whole numbers from 1 to ${MAX_LABS} with the smallest first, got ${minLabs} to ${maxLabs}`,
    )
  }
  for (const [name, limit] of [
    ['maxUnitsPerLabArm', maxUnitsPerLabArm],
    ['maxObsPerUnit', maxObsPerUnit],
  ] as const) {
    if (limit !== undefined && !(Number.isInteger(limit) && limit >= 1)) {
      throw new EngineInputError(
        `planFewestUnits: ${name} must be a whole number of at least 1, got ${limit}`,
      )
    }
  }
  const { labArmVariance, unitVariance, residualVariance, difference } = input
  const labVariance = input.labVariance ?? 0
  const variances = { labArmVariance, unitVariance, residualVariance, labVariance }
  const alphaPerComparison = alpha / ((arms * (arms - 1)) / 2)
  // Validates the variances, the difference and α.
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
      'planFewestUnits needs some spread inside the labs (between units or between observations)',
    )
  }
  const word = input.labWords ?? { one: 'lab', many: 'labs' }
  const labsWord = (n: number) => (n === 1 ? word.one : word.many)
  const notes: string[] = []
  const obsCap = maxObsPerUnit ?? COUNTS_OBS_CAP
  if (maxObsPerUnit === undefined) {
    notes.push(
      `Without costs, observations per unit were searched up to ${COUNTS_OBS_CAP}; set a limit to search a different range.`,
    )
  }
  const oneLabAllowed = design === 'every-arm' && labArmVariance === 0
  const firstLabs = Math.max(minLabs, oneLabAllowed ? 1 : 2)
  if (firstLabs > maxLabs) {
    throw new EngineInputError(
      design === 'one-arm'
        ? `planFewestUnits: with each ${word.one} running one arm, at least 2 ${word.many} per arm are needed`
        : `planFewestUnits: with one ${word.one}, how much ${word.many} differ in their response cannot be told apart from the effect; allow at least 2 ${word.many}, or set the ${word.one} × condition variance to 0 to plan for one ${word.one} alone`,
    )
  }
  if (firstLabs === 1 && maxLabs === 1 && maxUnitsPerLabArm === 1) {
    throw new EngineInputError('planFewestUnits: with one lab, at least 2 units per arm are needed')
  }
  if (firstLabs > minLabs) {
    notes.push(
      design === 'one-arm'
        ? `With one ${word.one} per arm the ${word.many} cannot be compared with each other, so the search starts at 2 ${word.many} per arm.`
        : `With one ${word.one}, how much ${word.many} differ in their response cannot be measured, so the search starts at 2 ${word.many}.`,
    )
  }

  const minUnits = (labs: number) => (labs === 1 && design === 'every-arm' ? 2 : 1)
  const powerAt = (labs: number, k: number, m: number) =>
    threeLevelPower({
      design,
      labs,
      unitsPerLabArm: k,
      obsPerUnit: m,
      ...variances,
      difference,
      alpha: alphaPerComparison,
    })
  const between = design === 'every-arm' ? labArmVariance : labVariance + labArmVariance
  const dfOf = (labs: number) => (design === 'every-arm' ? labs - 1 : 2 * (labs - 1))
  const delta = Math.abs(difference)
  const ceilingOf = (labs: number) =>
    labs === 1 || between === 0
      ? 1
      : twoSidedTPower(dfOf(labs), delta / Math.sqrt((2 * between) / labs), alphaPerComparison).power

  /** Smallest k (within the limit) reaching `goal` with these labs and m observations; null if none. */
  const smallestUnits = (labs: number, goal: number, m: number): number | null => {
    const first = minUnits(labs)
    const reaches = (k: number) => powerAt(labs, k, m).power >= goal
    let high: number
    if (maxUnitsPerLabArm !== undefined) {
      high = Math.max(first, maxUnitsPerLabArm)
      if (!reaches(high)) return null
    } else {
      if (ceilingOf(labs) < goal) return null
      high = first
      while (!reaches(high)) {
        high *= 2
        if (high > UNITS_LIMIT) return null
      }
    }
    return bisectUp(first, high, reaches)
  }
  /** Smallest m in [1, obsCap] that reaches `goal` with k units (which reach it at obsCap). */
  const smallestObs = (labs: number, k: number, goal: number) =>
    bisectUp(1, obsCap, (m) => powerAt(labs, k, m).power >= goal)

  let best: { labs: number; k: number } | null = null
  for (let labs = firstLabs; labs <= maxLabs; labs++) {
    if (best && arms * labs * minUnits(labs) > arms * best.labs * best.k) break
    const k = smallestUnits(labs, target, obsCap)
    if (k !== null && (!best || labs * k < best.labs * best.k)) best = { labs, k }
  }
  const fewestLabs = fewestLabsFor(ceilingOf, firstLabs, target)

  let feasible = true
  let chosen: { labs: number; k: number; m: number }
  if (best) {
    chosen = { ...best, m: smallestObs(best.labs, best.k, target) }
    if (maxUnitsPerLabArm !== undefined && chosen.k === maxUnitsPerLabArm)
      notes.push(`The limit on units per ${word.one} and arm is binding.`)
    if (maxObsPerUnit !== undefined && chosen.m === maxObsPerUnit)
      notes.push('The limit on observations per unit is binding.')
    if (chosen.labs === maxLabs && maxLabs > minLabs)
      notes.push(`The largest number of ${word.many} allowed is binding.`)
  } else {
    feasible = false
    const labs = maxLabs
    if (maxUnitsPerLabArm !== undefined) {
      const k = Math.max(minUnits(labs), maxUnitsPerLabArm)
      chosen = { labs, k, m: obsCap }
      notes.push(
        `No design within ${labs} ${labsWord(labs)}, ${k} units per ${word.one} and arm and ${obsCap} observations per unit reaches ${asPercent(target)} power; the most powerful one reaches ${asPercent(powerAt(labs, k, obsCap).power)}.`,
      )
    } else {
      const ceiling = ceilingOf(labs)
      const goal = ceiling - Math.min(0.02, (ceiling - alphaPerComparison) / 2)
      const k = smallestUnits(labs, goal, obsCap)
      if (k === null) throw new Error('planFewestUnits: no design below the ceiling was found')
      chosen = { labs, k, m: smallestObs(labs, k, goal) }
      notes.push(
        `No design with at most ${labs} ${labsWord(labs)} reaches ${asPercent(target)} power: with ${labs} ${labsWord(labs)} no number of units gets past ${asPercent(ceiling)}, because ${word.many} differ ${design === 'one-arm' ? 'from each other' : 'in how strongly they respond'}.${fewestLabs === null ? '' : ` It takes at least ${fewestLabs} ${labsWord(fewestLabs)}.`} Shown: the fewest units within 2 points of that limit.`,
      )
    }
  }
  if (arms > 2) {
    notes.push(
      `With ${arms} arms the power is that of each pairwise comparison at the Bonferroni level ${alphaPerComparison.toPrecision(3)}.`,
    )
  }
  const achieved = powerAt(chosen.labs, chosen.k, chosen.m)
  const labsBought = design === 'every-arm' ? 1 : arms
  return {
    feasible,
    design,
    labs: chosen.labs,
    unitsPerLabArm: chosen.k,
    obsPerUnit: chosen.m,
    arms,
    totalLabs: labsBought * chosen.labs,
    totalUnits: arms * chosen.labs * chosen.k,
    totalObs: arms * chosen.labs * chosen.k * chosen.m,
    achievedPower: achieved.power,
    df: achieved.df,
    alphaPerComparison,
    ceilingPower: ceilingOf(chosen.labs),
    fewestLabs,
    deff: 1 + (chosen.m - 1) * (unitVariance / within),
    searchedUpToObsPerUnit: obsCap,
    notes,
  }
}

/** Smallest whole x in [low, high] with ok(x), given ok(high) and ok rising with x. */
function bisectUp(low: number, high: number, ok: (x: number) => boolean): number {
  if (ok(low)) return low
  while (high - low > 1) {
    const mid = Math.floor((low + high) / 2)
    if (ok(mid)) high = mid
    else low = mid
  }
  return high
}

/** 0.8 → "80 %" (whole percentage points, as the planner shows power). */
function asPercent(p: number): string {
  return `${Math.round(p * 100)} %`
}
