import { nestedSufficientStats, type LevelCells } from '../reml/sufficient-stats'
import type { NestedDesign } from '../types'
import type { GlmmFamily } from './family'

/**
 * The rows the GLMM likelihood is summed over. Without covariates every observation of an
 * innermost cell (innermost unit × design cell) has the same linear predictor, so the cell's
 * likelihood depends only on its (successes, trials) or (count sum, observations): the rows are
 * the cells, and a million observations cost one pass. With covariates the rows are the
 * observations.
 */
export interface GlmmRows {
  family: GlmmFamily
  levels: LevelCells[]
  nInner: number
  nRows: number
  /** Fixed effects per row (intercept included). */
  p: number
  /** Innermost cell of each row. */
  cell: Int32Array
  /** Successes (binomial) or count sum (Poisson) per row. */
  y: Float64Array
  /** Trials (binomial) or observations (Poisson) per row. */
  n: Float64Array
  /** Design row of each row, row-major nRows × p. */
  x: Float64Array
}

/**
 * Builds the rows of a GLMM fit from a nested design and the per-observation trials (binomial;
 * null: one trial per observation). The design's response holds successes or counts.
 */
export function glmmRows(design: NestedDesign, family: GlmmFamily, trials: Float64Array | null): GlmmRows {
  const stats = nestedSufficientStats(design)
  const { cellOfObs, levels } = stats
  const nInner = levels[levels.length - 1].cellDesign.length
  const p = design.fixed.columns.length
  const { cellRows, covariateColumns } = design.fixed
  const trialsOf = (i: number) => (trials ? trials[i] : 1)

  if (design.covariates.length === 0) {
    const y = new Float64Array(nInner)
    const n = new Float64Array(nInner)
    for (let i = 0; i < design.nObs; i++) {
      y[cellOfObs[i]] += design.y[i]
      n[cellOfObs[i]] += trialsOf(i)
    }
    const x = new Float64Array(nInner * p)
    const cellDesign = levels[levels.length - 1].cellDesign
    for (let k = 0; k < nInner; k++)
      x.set(cellRows.subarray(cellDesign[k] * p, (cellDesign[k] + 1) * p), k * p)
    return {
      family,
      levels,
      nInner,
      nRows: nInner,
      p,
      cell: Int32Array.from({ length: nInner }, (_, k) => k),
      y,
      n,
      x,
    }
  }

  const nRows = design.nObs
  const x = new Float64Array(nRows * p)
  const n = new Float64Array(nRows)
  for (let i = 0; i < nRows; i++) {
    x.set(cellRows.subarray(design.cells.codes[i] * p, (design.cells.codes[i] + 1) * p), i * p)
    covariateColumns.forEach((col, j) => (x[i * p + col] = design.covariates[j].values[i]))
    n[i] = trialsOf(i)
  }
  return { family, levels, nInner, nRows, p, cell: cellOfObs, y: design.y, n, x }
}
