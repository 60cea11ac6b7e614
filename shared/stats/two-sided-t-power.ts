import { studentTQuantile } from './student-t-quantile'
import { EngineInputError } from './engine-input-error'
import { noncentralTCdf } from './noncentral-t-cdf'

export interface TwoSidedTPowerResult {
  power: number
  /** Two-sided critical value t_{1−α/2, df}. */
  tCritical: number
}

/**
 * Power of a two-sided t test at level α with ν degrees of freedom when the test statistic
 * follows a noncentral t distribution with noncentrality λ: the chance that |T′| exceeds the
 * critical value.
 *
 * Formula: power = P(T′ > t_{1−α/2, ν}) + P(T′ < −t_{1−α/2, ν}), T′ ~ noncentral t(ν, λ)
 * (Cohen 1988, Statistical Power Analysis for the Behavioral Sciences, ch. 2; the form R's
 * power.t.test uses with strict = TRUE). The noncentral t cdf is noncentralTCdf, the quantile
 * jStat's studentt.inv, as in clusterPower, so the two agree to the last digit on the same ν, λ.
 * The lower tail is skipped once λ > 8, where it is below Φ(−8) ≈ 6e−16.
 *
 * Guard errors: ν not a positive number, λ not finite, α outside (0, 1).
 *
 * @example
 * twoSidedTPower(19, 3.198021, 0.05) // → { power: 0.858325, tCritical: 2.093024 }
 */
export function twoSidedTPower(df: number, ncp: number, alpha: number): TwoSidedTPowerResult {
  if (typeof df !== 'number' || !(df > 0)) {
    throw new EngineInputError(`twoSidedTPower needs positive degrees of freedom, got ${df}`)
  }
  if (typeof ncp !== 'number' || !Number.isFinite(ncp)) {
    throw new EngineInputError(`twoSidedTPower needs a finite noncentrality, got ${ncp}`)
  }
  if (typeof alpha !== 'number' || !(alpha > 0 && alpha < 1)) {
    throw new EngineInputError(`twoSidedTPower: alpha must be between 0 and 1, got ${alpha}`)
  }
  const lambda = Math.abs(ncp)
  const tCritical = studentTQuantile(1 - alpha / 2, df)
  const upper = 1 - noncentralTCdf(tCritical, df, lambda)
  const lower = lambda > 8 ? 0 : noncentralTCdf(-tCritical, df, lambda)
  return { power: Math.min(1, Math.max(0, upper + lower)), tCritical }
}
