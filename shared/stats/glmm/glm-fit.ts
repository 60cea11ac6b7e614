import type { GlmmRows } from './glmm-rows'
import { generalisedLeastSquares, laplaceDeviance, linearPredictor, workingCells } from './laplace-deviance'

/**
 * The same fixed effects without any random intercept — every observation independent — by
 * iteratively reweighted least squares, with the covariance (XᵀWX)⁻¹ of β̂: the naive model the
 * nested one is compared with.
 *
 * Source: McCullagh & Nelder (1989), Generalized Linear Models, 2nd ed., §2.5.
 */
export function glmFit(rows: GlmmRows, nTerms: number): { beta: number[]; vcov: number[][] } {
  const zero = new Array<number>(nTerms).fill(0)
  const { beta } = laplaceDeviance(rows, zero, null, null)
  const eta = linearPredictor(rows, beta, new Float64Array(rows.nInner))
  return { beta, vcov: generalisedLeastSquares(rows, workingCells(rows, eta), zero).xtVxInverse }
}
