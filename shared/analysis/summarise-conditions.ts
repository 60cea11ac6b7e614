import jStat from 'jstat'
import type { GroupSummary } from '../schemas/analysis-result'
import { conditionMeans } from '../stats/condition-means'
import { EngineInputError } from '../stats/engine-input-error'
import { nestedDesignEffect } from '../stats/nested-design-effect'
import { observationsPerUnitByCondition } from '../stats/observations-per-unit-by-condition'
import type { NestedDesign, NestedFit } from '../stats/types'

/**
 * Per condition (or "all" without a condition): the plain mean; the naive SE and CI that treat
 * every observation as independent (SD/√n, t with n − 1 df); the cluster-correct SE and CI from
 * the mixed model (Satterthwaite df); the condition's own design effect and effective n; and the
 * number of units carrying it at the condition level.
 *
 * The condition's design effect uses the same variance shares as the whole analysis and the
 * sizes of the units restricted to that condition's observations:
 * deff_c = 1 + Σ_l ((cv_lc² + 1) m̄_lc − 1) ρ_l (Eldridge, Ashby & Kerry 2006, summed over levels),
 * effective n_c = n_c / deff_c (Kish 1965).
 *
 * Guard errors (EngineInputError): a condition with fewer than 2 observations.
 *
 * @example
 * summariseConditions(design, fit, [0.2, 0.1], 0.95)
 * // → [{ condition: 'vehicle', nObs: 240, mean: 101.2, naive: { se: 0.9, … }, clustered: { se: 2.6, … }, … }, …]
 */
export function summariseConditions(
  design: NestedDesign,
  fit: NestedFit,
  shares: number[],
  confidence: number,
): GroupSummary[] {
  const labels = design.condition?.labels ?? ['all']
  const codes = design.condition?.codes ?? new Int32Array(design.nObs)
  const k = labels.length
  const { y } = design

  const n = new Float64Array(k)
  const sum = new Float64Array(k)
  for (let i = 0; i < y.length; i++) {
    n[codes[i]]++
    sum[codes[i]] += y[i]
  }
  const mean = Array.from(sum, (s, c) => s / n[c])
  const squares = new Float64Array(k)
  for (let i = 0; i < y.length; i++) squares[codes[i]] += (y[i] - mean[codes[i]]) ** 2

  const modelMeans = conditionMeans(design, fit, confidence)
  // sizes[l][c]: observations of condition c in each unit of level l that holds any.
  const sizes = design.randomLevels.map((level) => observationsPerUnitByCondition(level, codes, k))
  const carrier = design.randomLevels.findIndex((level) => level.name === design.conditionLevel)
  const tail = 1 - (1 - confidence) / 2

  return labels.map((label, c) => {
    if (n[c] < 2) {
      throw new EngineInputError(
        `The condition "${label}" has ${n[c]} observation; at least 2 per condition are needed.`,
        design.condition?.name ?? null,
      )
    }
    const deff = nestedDesignEffect(
      sizes.map((bySize, l) => ({ unitSizes: bySize[c], share: shares[l] })),
    ).deff
    const naiveSe = Math.sqrt(squares[c] / (n[c] - 1) / n[c])
    const naiveHalf = jStat.studentt.inv(tail, n[c] - 1) * naiveSe
    const model = modelMeans[c]
    return {
      condition: label,
      nObs: n[c],
      nUnits: carrier >= 0 ? sizes[carrier][c].length : null,
      effectiveN: n[c] / deff,
      designEffect: deff,
      mean: mean[c],
      naive: { se: naiveSe, df: n[c] - 1, ciLow: mean[c] - naiveHalf, ciHigh: mean[c] + naiveHalf },
      clustered: {
        estimate: model.mean,
        se: model.se,
        df: model.df,
        ciLow: model.ciLower,
        ciHigh: model.ciUpper,
      },
    }
  })
}
