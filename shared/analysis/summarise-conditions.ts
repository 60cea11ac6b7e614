import type { GroupSummary } from '../schemas/analysis-result'
import { unitsPerCell } from './describe-design'
import type { CellMean } from '../stats/cell-means'
import { cellMeanRow } from '../stats/cell-mean-row'
import { contrastDesignEffect } from '../stats/contrast-design-effect'
import { EngineInputError } from '../stats/engine-input-error'
import { studentTQuantile } from '../stats/student-t-quantile'
import type { NestedDesign, NestedFit } from '../stats/types'

/**
 * Per design cell (each condition, each A × B combination, or "all" without a condition): the
 * plain mean; the naive SE and CI that treat every observation as independent (SD/√n, t with
 * n − 1 df); the cluster-correct interval from the mixed model (Satterthwaite df, covariates at
 * their means); the design effect of the cell's mean and its effective n; and the number of
 * units carrying it at the level whose units each hold one cell.
 *
 * The design effect of a cell's mean is its variance under the model over its variance if its
 * observations were independent (Kish 1965, the ratio definition); effective n = n_cell / deff.
 *
 * Guard errors (EngineInputError): a cell with fewer than 2 observations.
 *
 * @example
 * summariseConditions(design, fit, cellMeans(design, fit))
 * // → [{ condition: 'vehicle', nObs: 240, mean: 101.2, naive: { se: 0.9, … }, clustered: { se: 2.6, … }, … }, …]
 */
export function summariseConditions(
  design: NestedDesign,
  fit: NestedFit,
  means: CellMean[],
  confidence: number,
): GroupSummary[] {
  const { cells, y } = design
  const k = cells.labels.length
  const n = new Float64Array(k)
  const sum = new Float64Array(k)
  for (let i = 0; i < y.length; i++) {
    n[cells.codes[i]]++
    sum[cells.codes[i]] += y[i]
  }
  const mean = Array.from(sum, (s, c) => s / n[c])
  const squares = new Float64Array(k)
  for (let i = 0; i < y.length; i++) squares[cells.codes[i]] += (y[i] - mean[cells.codes[i]]) ** 2
  const units = unitsPerCell(design)
  const tail = 1 - (1 - confidence) / 2

  return cells.labels.map((label, c) => {
    if (n[c] < 2) {
      throw new EngineInputError(
        `The condition "${label}" has ${n[c]} observation; at least 2 per condition are needed.`,
        design.factors[0]?.name ?? null,
      )
    }
    const deff = contrastDesignEffect(design, fit, cellMeanRow(design, c))
    const naiveSe = Math.sqrt(squares[c] / (n[c] - 1) / n[c])
    const naiveHalf = studentTQuantile(tail, n[c] - 1) * naiveSe
    const model = means[c]
    const summary: GroupSummary = {
      condition: label,
      nObs: n[c],
      nUnits: units ? units[c] : null,
      effectiveN: n[c] / deff,
      designEffect: deff,
      mean: mean[c],
      naive: { se: naiveSe, df: n[c] - 1, ciLow: mean[c] - naiveHalf, ciHigh: mean[c] + naiveHalf },
      clustered: {
        estimate: model.estimate,
        se: model.se,
        df: model.df,
        ciLow: model.ci[0],
        ciHigh: model.ci[1],
      },
    }
    if (design.factors.length === 2) {
      summary.factorLevels = Object.fromEntries(
        design.factors.map((f, j) => [f.name, f.labels[cells.levelsOf[c][j]]]),
      )
    }
    return summary
  })
}
