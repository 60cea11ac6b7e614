import { cellMeanRow } from './cell-mean-row'
import { EngineInputError } from './engine-input-error'
import { satterthwaiteContrast } from './satterthwaite-contrast'
import { studentTQuantile } from './student-t-quantile'
import type { Interval, NestedDesign, NestedFit } from './types'

export interface CellMean extends Interval {
  /** The design cell's label ("vehicle", or "KO:vehicle" for two factors; "all" without a factor). */
  cell: string
}

/**
 * The model-estimated mean of each design cell (each condition, or each A × B combination) with
 * its cluster-correct standard error and a confidence interval from the t distribution with
 * Satterthwaite degrees of freedom — the error bar that respects the nesting. Covariates are held
 * at their means, so the cell means are adjusted for them. For a balanced design without
 * covariates it equals the SE of the mean of unit means.
 *
 *   mean_c = x_cᵀ β̂ (x_c: the cell's row of X, covariates at their means),
 *   se = √(x_cᵀ C x_c),  CI = mean ± t_{1−α/2, df} · se
 *
 * Source: Kuznetsova, Brockhoff & Christensen (2017), J Stat Softw 82(13) (Satterthwaite df for
 * lᵀβ); Searle, Casella & McCulloch (1992), Variance Components, ch. 3 (balanced equivalence);
 * Searle, Speed & Milliken (1980), Am Stat 34:216 (population marginal means at covariate means).
 *
 * Guard errors (EngineInputError): confidence outside (0, 1).
 *
 * @example
 * cellMeans(dyestuffDesign, dyestuffFit)
 * // → [{ cell: 'all', estimate: 1527.5, se: 19.38, df: 5, ci: [1477.67, 1577.33] }]
 */
export function cellMeans(design: NestedDesign, fit: NestedFit, confidence = 0.95): CellMean[] {
  if (!(confidence > 0 && confidence < 1)) {
    throw new EngineInputError(`The confidence level must lie between 0 and 1; got ${confidence}.`)
  }
  return design.cells.labels.map((cell, c) => {
    const t = satterthwaiteContrast(design, fit, cellMeanRow(design, c))
    const half = studentTQuantile(1 - (1 - confidence) / 2, t.df) * t.se
    return { cell, estimate: t.estimate, se: t.se, df: t.df, ci: [t.estimate - half, t.estimate + half] }
  })
}
