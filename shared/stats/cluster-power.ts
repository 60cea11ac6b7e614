import { EngineInputError } from './engine-input-error'
import { noncentralTCdf } from './noncentral-t-cdf'
import { studentTQuantile } from './student-t-quantile'
import { totalVariance, type TotalSpread } from './total-variance'

export interface ClusterPowerInput extends TotalSpread {
  /** Units (clusters, e.g. animals) per arm, k ≥ 2; may be fractional when used by a root finder. */
  unitsPerArm: number
  /** Observations per unit, m. */
  obsPerUnit: number
  /** Difference between the arm means to detect, δ (its sign does not matter). */
  difference: number
  /** Intraclass correlation ρ of the units, between 0 and 1. */
  icc: number
  /** Two-sided significance level, default 0.05. */
  alpha?: number
}

export interface ClusterPowerResult {
  power: number
  /** Design effect 1 + (m − 1)ρ. */
  deff: number
  /** Degrees of freedom 2(k − 1). */
  df: number
  /** Noncentrality √(k m / (2 deff)) · |δ| / σ_total. */
  ncp: number
  /** Two-sided critical value t_{1−α/2, df}. */
  tCritical: number
}

/**
 * Power of a two-arm comparison when whole units (animals, cultures) are assigned to the arms and
 * each contributes m observations: the test on unit means with 2(k − 1) degrees of freedom.
 *
 * Formula: deff = 1 + (m − 1)ρ, df = 2(k − 1), λ = √(k m / (2 deff)) · |δ| / σ_total,
 *   power = P(T′ > t_{1−α/2, df}) + P(T′ < −t_{1−α/2, df}), T′ ~ noncentral t(df, λ).
 * The noncentral t cdf is noncentralTCdf (Lenth's series, or a quadrature for large λ).
 * Source: the standard cluster-randomised two-sample formula (Donner & Klar 2000, Design
 * and Analysis of Cluster Randomization Trials in Health Research), as in the documentation of
 * the R package clusterPower (crtpwr.2mean); that package counts the upper tail only, which
 * differs from the two-sided value by the negligible lower tail.
 *
 * Guard errors: k < 2 (no unit-to-unit variance within an arm), m < 1, δ = 0 or not finite,
 * ρ outside [0, 1], α outside (0, 1), neither or both of sdTotal / variance, a non-positive spread.
 *
 * @example
 * clusterPower({ unitsPerArm: 16, obsPerUnit: 10, difference: 1, variance: 5, icc: 0.1 })
 * // → { power: 0.8018, deff: 1.9, df: 30, ncp: 2.9019, tCritical: 2.0423 }
 */
export function clusterPower(input: ClusterPowerInput): ClusterPowerResult {
  const { unitsPerArm: k, obsPerUnit: m, difference, icc } = input ?? ({} as ClusterPowerInput)
  const alpha = input?.alpha ?? 0.05
  if (typeof k !== 'number' || !Number.isFinite(k) || k < 2) {
    throw new EngineInputError(`clusterPower requires at least two units per arm, got ${k}`)
  }
  if (typeof m !== 'number' || !Number.isFinite(m) || m < 1) {
    throw new EngineInputError(`clusterPower requires at least one observation per unit, got ${m}`)
  }
  if (typeof difference !== 'number' || !Number.isFinite(difference) || difference === 0) {
    throw new EngineInputError(
      `clusterPower: the difference to detect must be a non-zero number, got ${difference}`,
    )
  }
  if (typeof icc !== 'number' || !(icc >= 0 && icc <= 1)) {
    throw new EngineInputError(`clusterPower: icc must be between 0 and 1, got ${icc}`)
  }
  if (typeof alpha !== 'number' || !(alpha > 0 && alpha < 1)) {
    throw new EngineInputError(`clusterPower: alpha must be between 0 and 1, got ${alpha}`)
  }
  const variance = totalVariance(input, 'clusterPower')
  const deff = 1 + (m - 1) * icc
  const df = 2 * (k - 1)
  const ncp = Math.sqrt((k * m) / (2 * deff)) * (Math.abs(difference) / Math.sqrt(variance))
  const tCritical = studentTQuantile(1 - alpha / 2, df)
  const upper = 1 - noncentralTCdf(tCritical, df, ncp)
  // P(T′ < −t) ≤ P(T′ < 0) = Φ(−λ), below 1e-15 once λ > 8: skip the second evaluation there.
  const lower = ncp > 8 ? 0 : noncentralTCdf(-tCritical, df, ncp)
  const power = Math.min(1, Math.max(0, upper + lower))
  return { power, deff, df, ncp, tCritical }
}
