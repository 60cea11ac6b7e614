import { chiSquareUpperP } from './chi-square-upper-p'
import { invertSpd } from './reml/small-cholesky'

/**
 * Wald chi-square test of Lβ = 0 (several rows), the test of a fixed term of a binary or count
 * model: χ² = (Lβ̂)ᵀ (L C Lᵀ)⁻¹ (Lβ̂) on rank(L) df. The value does not depend on which rows span
 * the hypothesis.
 *
 * Source: Wald (1943), Trans Am Math Soc 54:426; Fox & Weisberg (2019), An R Companion to
 * Applied Regression, 3rd ed., §4.4 (type III Wald tests, as car::Anova).
 *
 * @example
 * waldChiSquare(beta, vcov, [[0, 1, 0], [0, 0, 1]]) // → { chisq: 4.6, df: 2, p: 0.10 }
 */
export function waldChiSquare(
  beta: number[],
  vcov: number[][],
  rows: number[][],
): { chisq: number; df: number; p: number } {
  const Lb = rows.map((r) => r.reduce((s, v, k) => s + v * beta[k], 0))
  const LCL = rows.map((a) =>
    rows.map((b) => a.reduce((s, va, i) => s + va * b.reduce((t, vb, j) => t + vcov[i][j] * vb, 0), 0)),
  )
  const inverse = invertSpd(LCL)
  let chisq = 0
  for (let i = 0; i < rows.length; i++)
    for (let j = 0; j < rows.length; j++) chisq += Lb[i] * inverse[i][j] * Lb[j]
  return { chisq, df: rows.length, p: chiSquareUpperP(chisq, rows.length) }
}
