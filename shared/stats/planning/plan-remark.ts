import type { LabDesign } from '../three-level-variance'

/**
 * What a design search has to say beside its numbers, as a code with the numbers it rests on.
 * The library words none of it: the planner (shared/planning/plan-notes.ts) turns each into a
 * sentence in the outer level's own name, so the wording can change without touching the search.
 */
export type PlanRemark =
  /** costOptimalObsPerUnit's own explanation of an edge case (ICC 0 or 1, a cost of 0), passed on. */
  | { code: 'cost-optimum'; note: string }
  /** Observations per unit were searched up to `upTo` because no limit was given. */
  | { code: 'obs-search-range'; upTo: number; why: 'no-costs' | 'no-finite-optimum' }
  /** One lab was allowed but cannot do, so the search started at 2 labs (per arm for 'one-arm'). */
  | { code: 'labs-start-at-two'; design: LabDesign }
  | { code: 'units-limit-binds' }
  | { code: 'obs-limit-binds' }
  | { code: 'labs-limit-binds' }
  /** Nothing reaches the target within the limits; the most powerful design allowed is shown. */
  | {
      code: 'limits-fall-short'
      labs: number
      unitsPerLabArm: number
      obsPerUnit: number
      target: number
      bestPower: number
    }
  /** Lab-to-lab differences cap the power of `labs` labs below the target; a design near the cap is shown. */
  | {
      code: 'ceiling-falls-short'
      design: LabDesign
      labs: number
      target: number
      ceiling: number
      fewestLabs: number | null
      shown: 'fewest-units' | 'cheapest'
    }
  /** More than two arms: the power is each pairwise comparison's at α split over the pairs. */
  | { code: 'pairwise-bonferroni'; arms: number; alphaPerComparison: number }
