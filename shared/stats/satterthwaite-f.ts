import { EngineInputError } from './engine-input-error'
import { fUpperP } from './reml/f-upper-p'
import { quadraticForm } from './reml/quadratic-form'
import { satterthwaiteIngredients } from './reml/satterthwaite-ingredients'
import { symmetricEigen } from './reml/symmetric-eigen'
import type { NestedDesign, NestedFit } from './types'

export interface SatterthwaiteFResult {
  f: number
  /** Numerator df: the rank q of L C Lᵀ. */
  df1: number
  /** Satterthwaite denominator df. */
  df2: number
  p: number
}

/** √ of machine epsilon: eigenvalues of L C Lᵀ below this fraction of the largest count as zero (as lmerTest). */
const RANK_TOL = Math.sqrt(2.220446049250313e-16)

/**
 * F test of the joint hypothesis Lβ = 0 (several rows: e.g. "all condition means are equal")
 * with Satterthwaite's denominator degrees of freedom, the multi-df method of lmerTest.
 *
 * Let L C Lᵀ = P D Pᵀ (C = Cov(β̂)), q = number of eigenvalues above √ε × the largest, and
 * u_m = P_mᵀ L (m = 1 … q). Then F = (1/q) Σ (u_m β̂)² / d_m; each u_m has
 * ν_m = 2 d_m² / (g_mᵀ A g_m), g_mi = u_m (∂C/∂φ_i) u_mᵀ, and with E = Σ ν_m / (ν_m − 2) the
 * denominator df is 2E / (E − q) (2 when some ν_m ≤ 2; the common ν when all agree within 1e-8;
 * the t test's df when q = 1, where F = t²).
 *
 * Source: Fai & Cornelius (1996), J Stat Comput Simul 54:363; Kuznetsova, Brockhoff &
 * Christensen (2017), J Stat Softw 82(13), §3.3 (lmerTest's contestMD).
 *
 * Guard errors (EngineInputError): no rows, rows of the wrong length, non-finite entries, or
 * L C Lᵀ of rank 0.
 *
 * @example
 * satterthwaiteF(machinesDesign, machinesFit, [[0, 1, -0.5], [0, 0, 1]])
 * // → { f: 20.576, df1: 2, df2: 10.0, p: 0.000286 } (lmerTest anova(): same)
 */
export function satterthwaiteF(design: NestedDesign, fit: NestedFit, L: number[][]): SatterthwaiteFResult {
  const p = fit.beta.length
  if (L.length === 0) throw new EngineInputError('An F test needs at least one contrast row.')
  for (const row of L) {
    if (row.length !== p || !row.every(Number.isFinite)) {
      throw new EngineInputError(`Each contrast row needs ${p} finite coefficients, one per fixed effect.`)
    }
  }
  const ingredients = satterthwaiteIngredients(design, fit)
  const LC = L.map((row) =>
    fit.vcovBeta.map((_, j) => row.reduce((s, v, k) => s + v * fit.vcovBeta[k][j], 0)),
  )
  const VL = L.map((_, a) => L.map((rowB) => LC[a].reduce((s, v, j) => s + v * rowB[j], 0)))
  const { values, vectors } = symmetricEigen(VL)
  const tol = Math.max(RANK_TOL * values[0], 0)
  const q = values.filter((d) => d > tol).length
  if (q === 0) throw new EngineInputError('The contrast rows test nothing (their covariance has rank 0).')

  const rotated = vectors
    .slice(0, q)
    .map((vec) => fit.beta.map((_, j) => L.reduce((s, row, a) => s + vec[a] * row[j], 0)))
  let sumT2 = 0
  const nu = rotated.map((u, m) => {
    const est = u.reduce((s, v, j) => s + v * fit.beta[j], 0)
    sumT2 += (est * est) / values[m]
    const g = ingredients.jacobians.map((J) => quadraticForm(u, J))
    return (2 * values[m] * values[m]) / quadraticForm(g, ingredients.covariance)
  })
  const f = sumT2 / q
  const df2 = denominatorDf(nu)
  return { f, df1: q, df2, p: fUpperP(f, q, df2) }
}

function denominatorDf(nu: number[]): number {
  if (nu.length === 1) return nu[0]
  if (nu.every((v, i) => i === 0 || Math.abs(v - nu[i - 1]) < 1e-8))
    return nu.reduce((s, v) => s + v, 0) / nu.length
  if (nu.some((v) => v <= 2)) return 2
  const E = nu.reduce((s, v) => s + v / (v - 2), 0)
  return (2 * E) / (E - nu.length)
}
