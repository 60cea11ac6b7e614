import { EngineInputError } from './engine-input-error'
import { threeLevelVariance, type ThreeLevelVarianceInput } from './three-level-variance'
import { twoSidedTPower } from './two-sided-t-power'

export interface ThreeLevelPowerInput extends ThreeLevelVarianceInput {
  /** Difference between two arm means to detect, δ (its sign does not matter). */
  difference: number
  /** Two-sided significance level, default 0.05. */
  alpha?: number
}

export interface ThreeLevelPowerResult {
  power: number
  /** Variance of the estimated difference (threeLevelVariance). */
  variance: number
  df: number
  /** Noncentrality |δ| / √Var. */
  ncp: number
  tCritical: number
  /**
   * Power with the same labs as units per lab and observations per unit grow without bound: the
   * most these labs can reach. 1 when nothing limits it (no lab × arm variance, or one lab).
   */
  ceilingPower: number
}

/**
 * Power of the comparison of two arms in a three-level design (L labs, k units per lab and arm,
 * m observations per unit): a two-sided t test with the variance and df of threeLevelVariance.
 *
 * Formula: λ = |δ| / √Var, power = P(|T′| > t_{1−α/2, df}), T′ ~ noncentral t(df, λ)
 * (twoSidedTPower). Every lab running every arm: Var = (2σ²_lab×arm + 2(σ²_unit + σ²_resid/m)/k)/L,
 * df = L − 1 (Raudenbush & Liu 2000, Psychol Methods 5:199, with a unit level added inside the
 * site; their worked example as implemented in WebPower's wp.mrt2arm reproduces here, see the
 * test). With one lab it is clusterPower exactly. The ceiling: as k, m → ∞ the variance falls to
 * 2σ²_lab×arm / L and no more; its power is `ceilingPower`, which only more labs can lift.
 *
 * Guard errors: those of threeLevelVariance; δ = 0 or not finite; α outside (0, 1).
 *
 * @example
 * threeLevelPower({ labs: 4, unitsPerLabArm: 5, obsPerUnit: 20, labArmVariance: 2, unitVariance: 20, residualVariance: 100, difference: 8 })
 * // → { power: 0.8033, variance: 3.5, df: 3, ncp: 4.2762, tCritical: 3.1824, ceilingPower: 0.9983 }
 */
export function threeLevelPower(input: ThreeLevelPowerInput): ThreeLevelPowerResult {
  const difference = input?.difference
  const alpha = input?.alpha ?? 0.05
  if (typeof difference !== 'number' || !Number.isFinite(difference) || difference === 0) {
    throw new EngineInputError(
      `threeLevelPower: the difference to detect must be a non-zero number, got ${difference}`,
    )
  }
  if (typeof alpha !== 'number' || !(alpha > 0 && alpha < 1)) {
    throw new EngineInputError(`threeLevelPower: alpha must be between 0 and 1, got ${alpha}`)
  }
  const { variance, df, ceilingVariance } = threeLevelVariance(input)
  const delta = Math.abs(difference)
  const ncp = delta / Math.sqrt(variance)
  const { power, tCritical } = twoSidedTPower(df, ncp, alpha)
  const ceilingPower =
    ceilingVariance > 0 ? twoSidedTPower(df, delta / Math.sqrt(ceilingVariance), alpha).power : 1
  return { power, variance, df, ncp, tCritical, ceilingPower }
}
