import { satterthwaiteF, type SatterthwaiteFResult } from './satterthwaite-f'
import type { NestedDesign, NestedFit } from './types'

/**
 * F test that all condition means are equal (3 or more conditions), with Satterthwaite's
 * denominator df. The hypothesis rows are those lmerTest's anova() uses for a model with a
 * single fixed term: the condition rows of Uᵀ, where XᵀX = U D Uᵀ with U unit lower triangular
 * (Doolittle factorisation of the unweighted cross-product). The F value does not depend on
 * this choice of rows; the denominator df does slightly, so we follow lmerTest.
 *
 * Source: Kuznetsova, Brockhoff & Christensen (2017), J Stat Softw 82(13), §3.3 and §5
 * (type I/III hypotheses); Fai & Cornelius (1996), J Stat Comput Simul 54:363.
 *
 * Guard errors: none; returns null without a condition or with fewer than 3 conditions (the
 * single pairwise contrast is then the test).
 *
 * @example
 * omnibusF(machinesDesign, machinesFit) // → { f: 20.576, df1: 2, df2: 10.0, p: 0.000286 } (lmerTest anova: same)
 */
export function omnibusF(design: NestedDesign, fit: NestedFit): SatterthwaiteFResult | null {
  const condition = design.condition
  if (!condition || condition.labels.length < 3) return null
  const k = condition.labels.length
  const counts = new Array<number>(k).fill(0)
  for (let i = 0; i < condition.codes.length; i++) counts[condition.codes[i]]++
  // XᵀX for columns [1, d_1 … d_{k−1}].
  const xtx = Array.from({ length: k }, (_, r) =>
    Array.from({ length: k }, (__, c) =>
      r === 0 ? (c === 0 ? design.nObs : counts[c]) : c === 0 ? counts[r] : r === c ? counts[r] : 0,
    ),
  )
  const U = unitLowerFactor(xtx)
  const L = Array.from({ length: k - 1 }, (_, r) => Array.from({ length: k }, (__, c) => U[c][r + 1]))
  return satterthwaiteF(design, fit, L)
}

/** U with XᵀX = U D Uᵀ, U unit lower triangular (Gaussian elimination without pivoting). */
function unitLowerFactor(A: number[][]): number[][] {
  const n = A.length
  const a = A.map((row) => [...row])
  const U: number[][] = a.map((_, i) => a.map((__, j) => (i === j ? 1 : 0)))
  for (let c = 0; c < n; c++) {
    for (let r = c + 1; r < n; r++) {
      const f = a[r][c] / a[c][c]
      U[r][c] = f
      for (let j = c; j < n; j++) a[r][j] -= f * a[c][j]
    }
  }
  return U
}
