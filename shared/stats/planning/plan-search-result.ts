import type { LabDesign } from '../three-level-variance'
import type { PlanRemark } from './plan-remark'

/** What both design searches (planFewestUnits, planThreeLevel) answer, whatever they minimise. */
export interface PlanSearchResult {
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
  /** arms · L · k. */
  totalUnits: number
  totalObs: number
  /** Power of each pairwise comparison at `alphaPerComparison`. */
  achievedPower: number
  df: number
  /** α / (number of pairs) for more than two arms (Bonferroni), else α. */
  alphaPerComparison: number
  /** The most the recommended number of labs can reach, however many units and observations. */
  ceilingPower: number
  /** Fewest labs whose ceiling reaches the target power (labs per arm for 'one-arm'); null beyond 10 000. */
  fewestLabs: number | null
  /** Design effect 1 + (m − 1)ρ inside a unit, ρ = σ²_unit / (σ²_unit + σ²_resid). */
  deff: number
  /** Largest observations per unit that was searched. */
  searchedUpToObsPerUnit: number
  /** What the search has to say beside its numbers, as codes (worded by shared/planning/plan-notes). */
  remarks: PlanRemark[]
}
