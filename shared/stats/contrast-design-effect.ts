import { evaluateNestedReml } from './reml/evaluate-nested-reml'
import { nestedSufficientStats } from './reml/sufficient-stats'
import { quadraticForm } from './reml/quadratic-form'
import type { NestedDesign, NestedFit } from './types'

const independentCache = new WeakMap<NestedDesign, number[][]>()

/**
 * The design effect of one estimated quantity lᵀβ (a condition mean, a difference between
 * conditions): its variance under the fitted mixed model divided by its variance if all
 * observations were independent with the same total variance,
 *
 *   deff = lᵀ Cov(β̂) l / (σ²_total · lᵀ (XᵀX)⁻¹ l),  σ²_total = Σ variance components.
 *
 * Effective n = observations / deff. A variance that cancels out of the quantity (a lab variance
 * in a within-lab comparison) does not inflate it. On balanced two-level data without condition
 * it is 1 + (m − 1)·ICC for the mean.
 *
 * Source: Kish (1965), Survey Sampling, §8.2 (the ratio is the definition; 1 + (m − 1)ρ is its
 * balanced special case); Eldridge, Ashby & Kerry (2006), Int J Epidemiol 35:1292.
 *
 * Guard errors: none.
 *
 * @example
 * contrastDesignEffect(design, fit, [1]) // balanced, 6 units × 5, ICC 0.4185 (Dyestuff) → 1 + 4 · 0.4185 = 2.674
 */
export function contrastDesignEffect(design: NestedDesign, fit: NestedFit, weights: number[]): number {
  let independent = independentCache.get(design)
  if (!independent) {
    const k = nestedSufficientStats(design).nTheta
    independent = evaluateNestedReml(nestedSufficientStats(design), new Array(k).fill(0), true).xtHxInverse!
    independentCache.set(design, independent)
  }
  const total = fit.components.reduce((s, c) => s + c.variance, 0)
  return quadraticForm(weights, fit.vcovBeta) / (total * quadraticForm(weights, independent))
}
