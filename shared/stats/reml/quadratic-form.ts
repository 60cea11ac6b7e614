/**
 * The quadratic form vᵀ M v of a vector and a square matrix: the variance of lᵀβ̂ when M is
 * Cov(β̂), the scale of a Satterthwaite gradient when M is the covariance of the variance
 * parameters. Summed row by row in index order.
 *
 * Formula: vᵀ M v = Σᵢ Σⱼ vᵢ Mᵢⱼ vⱼ (common practice, no source).
 *
 * Guard errors: none; M must be at least v.length × v.length.
 *
 * @example
 * quadraticForm([1, 2], [[2, 1], [1, 3]]) // → 2 + 2 + 2 + 12 = 18
 */
export function quadraticForm(v: number[], M: number[][]): number {
  let s = 0
  for (let i = 0; i < v.length; i++) for (let j = 0; j < v.length; j++) s += v[i] * M[i][j] * v[j]
  return s
}
