import { satterthwaiteContrast } from './satterthwaite-contrast'
import type { FixedColumn, NestedDesign, NestedFit } from './types'

export interface FixedCoefficient extends FixedColumn {
  estimate: number
  se: number
  /** Satterthwaite degrees of freedom. */
  df: number
  t: number
  p: number
}

/**
 * Every fixed-effect coefficient with its standard error and a t test with Satterthwaite df, as
 * lmerTest's summary() shows them: the intercept (the reference cell's mean at covariates 0),
 * each non-reference label's difference from the reference (at the other factor's reference),
 * each covariate's slope, and each interaction coefficient.
 *
 * Source: Kuznetsova, Brockhoff & Christensen (2017), J Stat Softw 82(13), eq. 7 (contest1D).
 *
 * Guard errors: none.
 *
 * @example
 * fixedCoefficients(machinesDesign, machinesFit)[1]
 * // → { term: 'Machine', level: 'B', estimate: 7.967, se: 2.177, df: 10.0, t: 3.660, p: 0.00439 }
 */
export function fixedCoefficients(design: NestedDesign, fit: NestedFit): FixedCoefficient[] {
  const p = fit.beta.length
  return design.fixed.columns.map((column, j) => {
    const {
      estimate,
      se,
      df,
      t,
      p: pValue,
    } = satterthwaiteContrast(
      design,
      fit,
      Array.from({ length: p }, (_, k) => (k === j ? 1 : 0)),
    )
    return { ...column, estimate, se, df, t, p: pValue }
  })
}
