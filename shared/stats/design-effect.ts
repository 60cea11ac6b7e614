import { EngineInputError } from './engine-input-error'
import { unitSizeSummary } from './unit-size-summary'

export interface DesignEffectInput {
  /** Number of observations in each cluster (unit). */
  clusterSizes: number[]
  /** Intraclass correlation ρ of the clustering level, between 0 and 1. */
  icc: number
}

export interface DesignEffectResult {
  /** Kish's design effect for equal clusters of the mean size: 1 + (m̄ − 1)ρ. */
  kish: number
  /** Design effect allowing for unequal cluster sizes: 1 + ((cv² + 1) m̄ − 1)ρ. */
  unequal: number
  /** Mean cluster size m̄. */
  meanSize: number
  /** Coefficient of variation of the cluster sizes (SD with divisor k, see below). */
  cv: number
}

/**
 * Design effect: by how much clustering inflates the variance of a mean compared with the same
 * number of independent observations. Divide the number of observations by it to get the
 * effective n.
 *
 * Formulas: Kish (1965), Survey Sampling: deff = 1 + (m̄ − 1)ρ; for unequal cluster sizes
 * Eldridge, Ashby & Kerry (2006), Int J Epidemiol 35:1292: deff = 1 + ((cv² + 1) m̄ − 1)ρ.
 * The cv uses the SD of the sizes with divisor k (not k − 1), because then (cv² + 1) m̄ equals
 * Σ m_i² / Σ m_i exactly, the size-weighted mean cluster size that the formula is derived from
 * (Kerry & Bland 2001, Stat Med 20:377). With the k − 1 divisor the result is slightly larger.
 *
 * Guard errors: no clusters, a size that is not a positive finite number, ρ outside [0, 1].
 *
 * @example
 * designEffect({ clusterSizes: [10, 20, 30], icc: 0.1 })
 * // → { meanSize: 20, cv: 0.4082, kish: 2.9, unequal: 3.2333 }
 */
export function designEffect(input: DesignEffectInput): DesignEffectResult {
  const { clusterSizes, icc } = input ?? ({} as DesignEffectInput)
  if (!Array.isArray(clusterSizes) || clusterSizes.length === 0) {
    throw new EngineInputError('designEffect requires at least one cluster size')
  }
  if (typeof icc !== 'number' || !(icc >= 0 && icc <= 1)) {
    throw new EngineInputError(`designEffect: icc must be between 0 and 1, got ${icc}`)
  }
  const { meanSize, cv } = unitSizeSummary(clusterSizes, 'designEffect')
  return {
    kish: 1 + (meanSize - 1) * icc,
    unequal: 1 + ((cv * cv + 1) * meanSize - 1) * icc,
    meanSize,
    cv,
  }
}
