import { fUpperP } from './reml/f-upper-p'

export interface LeastSquaresParts {
  beta: number[]
  /** (XᵀX)⁻¹. */
  xtxInverse: number[][]
  /** Residual sum of squares. */
  rss: number
  /** Residual degrees of freedom n − p. */
  dfResidual: number
}

/**
 * F tests of linear hypotheses Lβ = 0 in an ordinary least-squares fit, one per term:
 *
 *   F = (Lβ̂)ᵀ [L (XᵀX)⁻¹ Lᵀ]⁻¹ (Lβ̂) / (q s²),  s² = RSS / (n − p),  df = (q, n − p)
 *
 * used for the naive analysis (every observation independent) and for the test on unit means.
 *
 * Source: Searle (1971), Linear Models, §3.6 (the general linear hypothesis).
 *
 * Guard errors: none; a term whose hypothesis has no row, or no residual df, gives no test.
 *
 * @example
 * leastSquaresTermTests({ beta: [2, 1], xtxInverse: [[0.5, -0.5], [-0.5, 1]], rss: 4, dfResidual: 4 }, [{ term: 'g', rows: [[0, 1]] }])
 * // → [{ term: 'g', df1: 1, df2: 4, f: 1, p: 0.3739 }]
 */
export function leastSquaresTermTests(
  parts: LeastSquaresParts,
  hypotheses: { term: string; rows: number[][] }[],
): { term: string; df1: number; df2: number; f: number; p: number }[] {
  const s2 = parts.rss / parts.dfResidual
  if (!(parts.dfResidual > 0) || !(s2 > 0)) return []
  return hypotheses
    .filter((h) => h.rows.length > 0)
    .map(({ term, rows }) => {
      const q = rows.length
      const Lb = rows.map((r) => r.reduce((s, v, k) => s + v * parts.beta[k], 0))
      const LCL = rows.map((a) =>
        rows.map((b) =>
          a.reduce((s, va, i) => s + va * b.reduce((t, vb, j) => t + parts.xtxInverse[i][j] * vb, 0), 0),
        ),
      )
      const f = quadraticInverse(LCL, Lb) / (q * s2)
      return { term, df1: q, df2: parts.dfResidual, f, p: fUpperP(f, q, parts.dfResidual) }
    })
}

/** vᵀ A⁻¹ v for a small symmetric positive definite A (Cholesky). */
function quadraticInverse(A: number[][], v: number[]): number {
  const n = v.length
  const L = A.map(() => new Array<number>(n).fill(0))
  for (let j = 0; j < n; j++) {
    let s = A[j][j]
    for (let k = 0; k < j; k++) s -= L[j][k] ** 2
    L[j][j] = Math.sqrt(s)
    for (let i = j + 1; i < n; i++) {
      let t = A[i][j]
      for (let k = 0; k < j; k++) t -= L[i][k] * L[j][k]
      L[i][j] = t / L[j][j]
    }
  }
  let total = 0
  const z = new Array<number>(n)
  for (let i = 0; i < n; i++) {
    let t = v[i]
    for (let k = 0; k < i; k++) t -= L[i][k] * z[k]
    z[i] = t / L[i][i]
    total += z[i] * z[i]
  }
  return total
}
