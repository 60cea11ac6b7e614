import { EngineInputError } from './engine-input-error'
import { quadraticForm } from './reml/quadratic-form'
import { satterthwaiteIngredients } from './reml/satterthwaite-ingredients'
import { studentTTwoSidedP } from './reml/student-t-two-sided-p'
import type { NestedDesign, NestedFit } from './types'

export interface SatterthwaiteContrastResult {
  /** lᵀβ̂ */
  estimate: number
  /** √(lᵀ C l), C = Cov(β̂). */
  se: number
  /** Satterthwaite degrees of freedom. */
  df: number
  t: number
  /** Two-sided p-value from the t distribution with df degrees of freedom. */
  p: number
}

/**
 * Tests one linear combination lᵀβ of the fixed effects (a condition mean, a difference
 * between conditions) with Satterthwaite's approximation to the degrees of freedom of its t
 * statistic, as lmerTest does for lme4 fits.
 *
 *   t = lᵀβ̂ / √(lᵀCl),   df = 2 (lᵀCl)² / (gᵀ A g)
 *   g_i = lᵀ (∂C/∂φ_i) l,  A = 2 H⁻¹,  H = Hessian of −2 log restricted likelihood in φ
 *
 * Source: Satterthwaite (1946), Biometrics Bulletin 2:110; Giesbrecht & Burns (1985),
 * Biometrics 41:477; Kuznetsova, Brockhoff & Christensen (2017), J Stat Softw 82(13), eq. 7.
 *
 * Guard errors (EngineInputError): l with the wrong length or non-finite entries, or l = 0.
 *
 * @example
 * satterthwaiteContrast(machinesDesign, machinesFit, [0, 1, 0])
 * // → { estimate: 7.967, se: 2.177, df: 10.0, t: 3.660, p: 0.00439 } (lmerTest contest: same)
 */
export function satterthwaiteContrast(
  design: NestedDesign,
  fit: NestedFit,
  L: number[],
): SatterthwaiteContrastResult {
  const p = fit.beta.length
  if (L.length !== p || !L.every(Number.isFinite)) {
    throw new EngineInputError(
      `A contrast needs ${p} finite coefficients, one per fixed effect; got ${L.length}.`,
    )
  }
  if (L.every((v) => v === 0))
    throw new EngineInputError('A contrast must have at least one non-zero coefficient.')
  const ingredients = satterthwaiteIngredients(design, fit)
  const estimate = L.reduce((s, v, i) => s + v * fit.beta[i], 0)
  const variance = quadraticForm(L, fit.vcovBeta)
  const g = ingredients.jacobians.map((J) => quadraticForm(L, J))
  const df = (2 * variance * variance) / quadraticForm(g, ingredients.covariance)
  const se = Math.sqrt(variance)
  const t = estimate / se
  return { estimate, se, df, t, p: studentTTwoSidedP(t, df) }
}
