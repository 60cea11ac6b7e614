import jStat from 'jstat'
import { EngineInputError } from './engine-input-error'
import { satterthwaiteContrast } from './satterthwaite-contrast'
import type { NestedDesign, NestedFit } from './types'

export interface ConditionMean {
  /** Condition label; null for the overall mean of a design without condition. */
  condition: string | null
  /** Model-estimated mean: intercept + the condition's effect. */
  mean: number
  /** Cluster-correct standard error (from the mixed model). */
  se: number
  /** Satterthwaite degrees of freedom. */
  df: number
  ciLower: number
  ciUpper: number
  confidence: number
}

/**
 * The model-estimated mean of each condition with its cluster-correct standard error and a
 * confidence interval from the t distribution with Satterthwaite degrees of freedom — the error
 * bar that respects the nesting. For a balanced design it equals the SE of the mean of unit means.
 *
 *   mean_j = β₀ + β_j (β₀ for the reference),  se = √(lᵀ C l),  CI = mean ± t_{1−α/2, df} · se
 *
 * Source: Kuznetsova, Brockhoff & Christensen (2017), J Stat Softw 82(13) (Satterthwaite df for
 * lᵀβ); Searle, Casella & McCulloch (1992), Variance Components, ch. 3 (balanced equivalence).
 *
 * Guard errors (EngineInputError): confidence outside (0, 1).
 *
 * @example
 * conditionMeans(dyestuffDesign, dyestuffFit)
 * // → [{ condition: null, mean: 1527.5, se: 19.38, df: 5, ciLower: 1477.67, ciUpper: 1577.33, confidence: 0.95 }]
 */
export function conditionMeans(design: NestedDesign, fit: NestedFit, confidence = 0.95): ConditionMean[] {
  if (!(confidence > 0 && confidence < 1)) {
    throw new EngineInputError(`The confidence level must lie between 0 and 1; got ${confidence}.`)
  }
  const labels: (string | null)[] = design.condition ? design.condition.labels : [null]
  return labels.map((condition, j) => {
    const L = fit.beta.map((_, i) => (i === 0 || i === j ? 1 : 0))
    const c = satterthwaiteContrast(design, fit, L)
    const half = jStat.studentt.inv(1 - (1 - confidence) / 2, c.df) * c.se
    return {
      condition,
      mean: c.estimate,
      se: c.se,
      df: c.df,
      ciLower: c.estimate - half,
      ciUpper: c.estimate + half,
      confidence,
    }
  })
}
