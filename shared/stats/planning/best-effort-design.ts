import type { CheckedPlanSearch } from './check-plan-search-input'
import type { PlanRemark } from './plan-remark'
import type { PlanSearchModel } from './plan-search-model'

interface Chosen {
  labs: number
  k: number
  m: number
}

/**
 * The design a search reports when nothing within the limits reaches the target, with the remark
 * that says so. With a limit on units per lab: the most powerful design the limits allow (most
 * labs, units and observations). Without one, more units could always add power, but only up to
 * the ceiling the lab-level variance sets: then `nearCeiling` gives the search's own best design
 * with the most labs allowed within 2 percentage points of that ceiling (half the gap to α when
 * the ceiling is closer to α than that), the goal any search can still reach.
 */
export function bestEffortDesign<T extends Chosen>(options: {
  checked: CheckedPlanSearch
  model: PlanSearchModel
  /** Observations per unit searched at most. */
  obsCap: number
  fewestLabs: number | null
  /** The design at the limits: L labs, k units, m observations. */
  mostAllowed: (labs: number, k: number, m: number) => T
  /** The search's best design with these labs that reaches `goal`; null if none. */
  nearCeiling: (labs: number, goal: number) => T | null
  shown: 'fewest-units' | 'cheapest'
  caller: string
}): { chosen: T; remark: PlanRemark } {
  const { checked, model, obsCap, fewestLabs, shown, caller } = options
  const { design, target, alphaPerComparison, maxUnitsPerLabArm } = checked
  const labs = checked.maxLabs
  if (maxUnitsPerLabArm !== undefined) {
    const k = Math.max(model.minUnits(labs), maxUnitsPerLabArm)
    const chosen = options.mostAllowed(labs, k, obsCap)
    const bestPower = model.powerAt(labs, k, obsCap).power
    return {
      chosen,
      remark: { code: 'limits-fall-short', labs, unitsPerLabArm: k, obsPerUnit: obsCap, target, bestPower },
    }
  }
  const ceiling = model.ceilingOf(labs)
  const goal = ceiling - Math.min(0.02, (ceiling - alphaPerComparison) / 2)
  const chosen = options.nearCeiling(labs, goal)
  if (!chosen) throw new Error(`${caller}: no design below the ceiling was found`)
  return { chosen, remark: { code: 'ceiling-falls-short', design, labs, target, ceiling, fewestLabs, shown } }
}
