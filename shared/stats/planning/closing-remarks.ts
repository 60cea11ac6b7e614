import type { CheckedPlanSearch } from './check-plan-search-input'
import type { PlanRemark } from './plan-remark'

/**
 * The remarks every design search ends with, in the order the planner shows them: that the search
 * started at 2 labs, then either why the target was missed (`shortfall`) or which limits bind
 * the chosen design, then the Bonferroni level for more than two arms.
 */
export function closingRemarks(
  checked: CheckedPlanSearch,
  chosen: { labs: number; k: number; m: number },
  shortfall: PlanRemark | null,
): PlanRemark[] {
  const { design, arms, alphaPerComparison, minLabs, maxLabs, maxUnitsPerLabArm, maxObsPerUnit } = checked
  const remarks: PlanRemark[] = []
  if (checked.firstLabs > minLabs) remarks.push({ code: 'labs-start-at-two', design })
  if (shortfall) {
    remarks.push(shortfall)
  } else {
    if (maxUnitsPerLabArm !== undefined && chosen.k === maxUnitsPerLabArm)
      remarks.push({ code: 'units-limit-binds' })
    if (maxObsPerUnit !== undefined && chosen.m === maxObsPerUnit) remarks.push({ code: 'obs-limit-binds' })
    if (chosen.labs === maxLabs && maxLabs > minLabs) remarks.push({ code: 'labs-limit-binds' })
  }
  if (arms > 2) remarks.push({ code: 'pairwise-bonferroni', arms, alphaPerComparison })
  return remarks
}
