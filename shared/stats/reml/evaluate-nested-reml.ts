import type { NestedSufficientStats } from './sufficient-stats'

/** The pieces of the REML criterion at one θ, with H = V / σ² = I + Σ_l θ_l Z_l Z_lᵀ. */
export interface NestedRemlEvaluation {
  /** log |H|. */
  logDetH: number
  /** log |Xᵀ H⁻¹ X|. */
  logDetXtHX: number
  /** Generalised residual sum of squares r² = (y − Xβ̂)ᵀ H⁻¹ (y − Xβ̂). */
  r2: number
  /** Profiled REML criterion (σ² = r² / (n − p) plugged in), lme4's REML deviance. */
  deviance: number
  /** Present when asked for: β̂ (intercept on the original y scale) and (Xᵀ H⁻¹ X)⁻¹. */
  beta?: number[]
  xtHxInverse?: number[][]
}

const LOG_2PI = Math.log(2 * Math.PI)

/**
 * Evaluates the REML criterion of a nested random-intercept model at variance ratios θ
 * (θ_l = σ_l² / σ², outermost level first), working from the innermost units outwards.
 *
 * Each unit is summarised by (a, μ, scatter) such that its block of Mᵀ H⁻¹ M, with M the model
 * columns [1, X, y], equals W + a μ μᵀ (μ₀ = 1). For an innermost unit a = n / (1 + θ n) and μ
 * is the unit mean. A parent sums its children (A = Σ a_c, μ̄ = Σ a_c μ_c / A, and the
 * scatter Σ a_c (μ_c − μ̄)(μ_c − μ̄)ᵀ joins W), then the Sherman–Morrison update of its own
 * random intercept turns A into A / (1 + θ A) and adds log(1 + θ A) to log |H|. No step
 * subtracts large numbers, so precision holds on a million rows. At the top
 * Xᵀ H⁻¹ X = [[A, A μ̄ₓᵀ], [A μ̄ₓ, Wₓₓ + A μ̄ₓ μ̄ₓᵀ]], whence
 * log |Xᵀ H⁻¹ X| = log A + log |Wₓₓ| and r² = W_yy − W_yx Wₓₓ⁻¹ Wₓy.
 *
 * Criterion (Bates et al. 2015, J Stat Softw 67(1), eq. 42):
 *   d(θ) = log |H| + log |Xᵀ H⁻¹ X| + (n − p) (1 + log(2π r² / (n − p))).
 *
 * Guard errors: none; a response with no residual variation gives r² = 0 and an infinite criterion.
 *
 * @example
 * evaluateNestedReml(stats, [1.2]).deviance // Dyestuff at θ = 1.2 → a number near 319.7
 */
export function evaluateNestedReml(
  stats: NestedSufficientStats,
  theta: ArrayLike<number>,
  full = false,
): NestedRemlEvaluation {
  const { m, p, nLevels: K, nObs } = stats
  const W = Float64Array.from(stats.within)
  let logDetH = 0

  const nInner = stats.innerN.length
  let a = new Float64Array(nInner)
  let mu = stats.innerMean
  const thInner = theta[K - 1]
  for (let u = 0; u < nInner; u++) {
    const n = stats.innerN[u]
    a[u] = n / (1 + thInner * n)
    logDetH += Math.log1p(thInner * n)
  }

  const mean = new Float64Array(m)
  let topA = 0
  const topMean = new Float64Array(m)
  for (let l = K - 2; l >= -1; l--) {
    const nParents = l >= 0 ? stats.nUnits[l] : 1
    const start = l >= 0 ? stats.childStart[l] : null
    const th = l >= 0 ? theta[l] : 0
    const nextA = new Float64Array(nParents)
    const nextMu = new Float64Array(nParents * m)
    for (let q = 0; q < nParents; q++) {
      const c0 = start ? start[q] : 0
      const c1 = start ? start[q + 1] : a.length
      let A = 0
      mean.fill(0)
      for (let c = c0; c < c1; c++) {
        const ac = a[c]
        A += ac
        for (let j = 0; j < m; j++) mean[j] += ac * mu[c * m + j]
      }
      for (let j = 0; j < m; j++) mean[j] /= A
      for (let c = c0; c < c1; c++) {
        const ac = a[c]
        for (let j = 0; j < m; j++) {
          const dj = ac * (mu[c * m + j] - mean[j])
          for (let k = 0; k <= j; k++) W[j * m + k] += dj * (mu[c * m + k] - mean[k])
        }
      }
      if (l >= 0) {
        nextA[q] = A / (1 + th * A)
        logDetH += Math.log1p(th * A)
        nextMu.set(mean, q * m)
      } else {
        topA = A
        topMean.set(mean)
      }
    }
    a = nextA
    mu = nextMu
  }
  // The loop filled the lower triangle only (the within matrix is symmetric from the start).
  for (let j = 0; j < m; j++) for (let k = 0; k < j; k++) W[k * m + j] = W[j * m + k]

  // Cholesky of W; its last pivot squared is the Schur complement r².
  const L = new Float64Array(m * m)
  let logDetWxx = 0
  let r2 = NaN
  for (let j = 0; j < m; j++) {
    let s = W[j * m + j]
    for (let k = 0; k < j; k++) s -= L[j * m + k] * L[j * m + k]
    if (j === m - 1) {
      r2 = s
      L[j * m + j] = Math.sqrt(Math.max(s, 0))
      break
    }
    const d = Math.sqrt(s)
    L[j * m + j] = d
    logDetWxx += 2 * Math.log(d)
    for (let i = j + 1; i < m; i++) {
      let t = W[i * m + j]
      for (let k = 0; k < j; k++) t -= L[i * m + k] * L[j * m + k]
      L[i * m + j] = t / d
    }
  }
  const logDetXtHX = Math.log(topA) + logDetWxx
  const dfRes = nObs - p
  const deviance = logDetH + logDetXtHX + dfRes * (1 + LOG_2PI + Math.log(r2 / dfRes))
  const result: NestedRemlEvaluation = { logDetH, logDetXtHX, r2, deviance }
  if (full) Object.assign(result, fixedEffects(W, m, topA, topMean, stats.shift))
  return result
}

/** β̂ and (XᵀH⁻¹X)⁻¹ from the top-level summaries, by the block inverse around the intercept. */
function fixedEffects(W: Float64Array, m: number, A: number, topMean: Float64Array, shift: number) {
  const px = m - 1
  const Winv = invertSpd(W, m, px)
  const b = new Array<number>(px).fill(0)
  for (let j = 0; j < px; j++) for (let k = 0; k < px; k++) b[j] += Winv[j][k] * W[k * m + px]
  let b0 = topMean[px] + shift
  for (let j = 0; j < px; j++) b0 -= topMean[j] * b[j]

  const wm = new Array<number>(px).fill(0)
  for (let j = 0; j < px; j++) for (let k = 0; k < px; k++) wm[j] += Winv[j][k] * topMean[k]
  let c00 = 1 / A
  for (let j = 0; j < px; j++) c00 += topMean[j] * wm[j]
  const inv: number[][] = [[c00, ...wm.map((v) => -v)]]
  for (let j = 0; j < px; j++) inv.push([-wm[j], ...Winv[j]])
  return { beta: [b0, ...b], xtHxInverse: inv }
}

/** Inverse of the leading size × size block of a symmetric positive definite m × m matrix. */
function invertSpd(W: Float64Array, m: number, size: number): number[][] {
  const a: number[][] = []
  for (let i = 0; i < size; i++) {
    a.push([])
    for (let j = 0; j < size; j++) a[i].push(W[i * m + j])
  }
  const inv: number[][] = a.map((_, i) => a.map((__, j) => (i === j ? 1 : 0)))
  // Gauss–Jordan without pivoting is stable for a positive definite matrix.
  for (let c = 0; c < size; c++) {
    const piv = a[c][c]
    for (let j = 0; j < size; j++) {
      a[c][j] /= piv
      inv[c][j] /= piv
    }
    for (let r = 0; r < size; r++) {
      if (r === c) continue
      const f = a[r][c]
      if (f === 0) continue
      for (let j = 0; j < size; j++) {
        a[r][j] -= f * a[c][j]
        inv[r][j] -= f * inv[c][j]
      }
    }
  }
  return inv
}
