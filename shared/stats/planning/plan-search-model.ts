import { threeLevelPower } from '../three-level-power'
import { twoSidedTPower } from '../two-sided-t-power'
import type { CheckedPlanSearch } from './check-plan-search-input'

/** The power model both design searches walk over, fixed by their checked input. */
export interface PlanSearchModel {
  /** threeLevelPower at L labs, k units per lab and arm, m observations per unit, at α per comparison. */
  powerAt: (labs: number, k: number, m: number) => ReturnType<typeof threeLevelPower>
  /** df of the test: L − 1 when every lab runs every arm, 2(L − 1) when each runs one arm. */
  dfOf: (labs: number) => number
  /** The variance between labs that more units cannot average away (σ²_lab×arm, + σ²_lab for 'one-arm'). */
  between: number
  /** The most L labs can reach, however many units and observations (1 for one lab or no lab-level variance). */
  ceilingOf: (labs: number) => number
  /** Fewest units per lab and arm: 2 for one lab (the two-level test needs 2(k − 1) > 0 df), else 1. */
  minUnits: (labs: number) => number
}

/**
 * The power of a design and the ceiling of a number of labs, as threeLevelPower defines them
 * (Raudenbush & Liu 2000, Psychol Methods 5:199, with a unit level): the ceiling is the power of
 * the t test on L − 1 (or 2(L − 1)) df when only the lab-level variance is left, δ / √(2·between/L).
 */
export function planSearchModel(checked: CheckedPlanSearch): PlanSearchModel {
  const { design, variances, difference, alphaPerComparison } = checked
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
  const dfOf = (labs: number) => (design === 'every-arm' ? labs - 1 : 2 * (labs - 1))
  const between =
    design === 'every-arm' ? variances.labArmVariance : variances.labVariance + variances.labArmVariance
  const delta = Math.abs(difference)
  const ceilingOf = (labs: number) =>
    labs === 1 || between === 0
      ? 1
      : twoSidedTPower(dfOf(labs), delta / Math.sqrt((2 * between) / labs), alphaPerComparison).power
  const minUnits = (labs: number) => (labs === 1 && design === 'every-arm' ? 2 : 1)
  return { powerAt, dfOf, between, ceilingOf, minUnits }
}
