import type { NestedDesign } from './types'

/**
 * The row x_c of the fixed-effects design whose product with β is design cell c's mean: the
 * intercept, the cell's factor dummies and interaction dummies, and every covariate at its mean
 * (so cell means and their differences are adjusted for the covariates).
 *
 * Source: Searle, Speed & Milliken (1980), Am Stat 34:216 (population marginal means).
 *
 * Guard errors: none.
 *
 * @example
 * cellMeanRow(machinesDesign, 1) // → [1, 1, 0] (intercept + Machine B)
 */
export function cellMeanRow(design: NestedDesign, c: number): number[] {
  const { cellRows, covariateColumns, columns } = design.fixed
  const p = columns.length
  const row = Array.from(cellRows.subarray(c * p, (c + 1) * p))
  covariateColumns.forEach((col, j) => (row[col] = design.covariates[j].mean))
  return row
}
