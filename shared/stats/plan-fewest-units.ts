import { bestEffortDesign } from './planning/best-effort-design'
import { checkPlanSearchInput, type PlanSearchInput } from './planning/check-plan-search-input'
import { closingRemarks } from './planning/closing-remarks'
import { fewestLabsFor } from './planning/fewest-labs-for'
import type { PlanRemark } from './planning/plan-remark'
import type { PlanSearchResult } from './planning/plan-search-result'
import { planSearchModel } from './planning/plan-search-model'
import { designCounts } from './planning/design-counts'

/** Upper limit on observations per unit defaults to 100 without costs (see COUNTS_OBS_CAP). */
export type PlanFewestUnitsInput = PlanSearchInput

/** totalUnits (arms · L · k) is the number this plan keeps as small as it can. */
export type PlanFewestUnitsResult = PlanSearchResult

/**
 * Without costs, observations per unit are searched up to this many. Common practice, no source:
 * past a few dozen observations a unit's mean is pinned down by the unit's own variance, and 100
 * cells, fields or wells per unit is beyond what most protocols measure. A limit replaces it.
 */
export const COUNTS_OBS_CAP = 100
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
  const checked = checkPlanSearchInput(input, 'planFewestUnits')
  const { design, arms, target, alphaPerComparison, within, firstLabs, maxLabs } = checked
  const { maxUnitsPerLabArm, maxObsPerUnit } = checked
  const model = planSearchModel(checked)
  const { powerAt, ceilingOf, minUnits } = model
  const remarks: PlanRemark[] = []
  const obsCap = maxObsPerUnit ?? COUNTS_OBS_CAP
  if (maxObsPerUnit === undefined)
    remarks.push({ code: 'obs-search-range', upTo: COUNTS_OBS_CAP, why: 'no-costs' })

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

  const { chosen, remark: shortfall } = best
    ? { chosen: { ...best, m: smallestObs(best.labs, best.k, target) }, remark: null }
    : bestEffortDesign({
        checked,
        model,
        obsCap,
        fewestLabs,
        mostAllowed: (labs, k, m) => ({ labs, k, m }),
        nearCeiling: (labs, goal) => {
          const k = smallestUnits(labs, goal, obsCap)
          return k === null ? null : { labs, k, m: smallestObs(labs, k, goal) }
        },
        shown: 'fewest-units',
        caller: 'planFewestUnits',
      })
  remarks.push(...closingRemarks(checked, chosen, shortfall))
  const achieved = powerAt(chosen.labs, chosen.k, chosen.m)
  return {
    feasible: shortfall === null,
    design,
    ...designCounts(design, arms, chosen),
    achievedPower: achieved.power,
    df: achieved.df,
    alphaPerComparison,
    ceilingPower: ceilingOf(chosen.labs),
    fewestLabs,
    deff: 1 + (chosen.m - 1) * (checked.variances.unitVariance / within),
    searchedUpToObsPerUnit: obsCap,
    remarks,
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
