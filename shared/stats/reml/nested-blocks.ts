import { choleskyInto, solveCholeskyInto } from './small-cholesky'
import type { LevelCells, NestedSufficientStats } from './sufficient-stats'

/**
 * The per-unit steps of the nested Woodbury recursion (see evaluateNestedReml for the algebra):
 * each unit's B matrix over its cells, the application of the unit's own random intercepts
 * (B → (B⁻¹ + Ψ)⁻¹), and the merge of child units' cells into their parents' cells. Shared by
 * the REML criterion and the conditional modes of the GLMM fit.
 */

const scratches = new WeakMap<NestedSufficientStats, Scratch>()

/** Scratch space sized for the most cells any unit holds (at most the number of design cells). */
export function scratchFor(stats: NestedSufficientStats): Scratch {
  let scratch = scratches.get(stats)
  if (!scratch) {
    let q = 1
    for (const level of stats.levels)
      for (let u = 0; u < level.nUnits; u++) q = Math.max(q, level.cellStart[u + 1] - level.cellStart[u])
    scratch = new Scratch(q, stats.m)
    scratches.set(stats, scratch)
  }
  return scratch
}

/** The B matrices of every unit of a level, q_u × q_u each, stored one after another. */
export interface Blocks {
  /** blocks[offset[u] …] holds unit u's matrix, row-major. */
  offset: Int32Array
  blocks: Float64Array
}

export function diagonalBlocks(cellStart: Int32Array, n: Float64Array): Blocks {
  const nUnits = cellStart.length - 1
  const offset = new Int32Array(nUnits + 1)
  for (let u = 0; u < nUnits; u++) {
    const q = cellStart[u + 1] - cellStart[u]
    offset[u + 1] = offset[u] + q * q
  }
  const blocks = new Float64Array(offset[nUnits])
  for (let u = 0; u < nUnits; u++) {
    const c0 = cellStart[u]
    const q = cellStart[u + 1] - c0
    for (let a = 0; a < q; a++) blocks[offset[u] + a * q + a] = n[c0 + a]
  }
  return { offset, blocks }
}

/** Scratch space for the per-unit small matrices, reused across units so an evaluation allocates little. */
export class Scratch {
  readonly psi: Float64Array
  readonly L: Float64Array
  readonly PL: Float64Array
  readonly M: Float64Array
  readonly R: Float64Array
  readonly X: Float64Array
  readonly G: Float64Array
  readonly d: Float64Array
  readonly e: Float64Array
  constructor(q: number, m: number) {
    const qq = q * q
    this.psi = new Float64Array(qq)
    this.L = new Float64Array(qq)
    this.PL = new Float64Array(qq)
    this.M = new Float64Array(qq)
    this.R = new Float64Array(qq)
    this.X = new Float64Array(Math.max(qq, q * m))
    this.G = new Float64Array(q * m)
    this.d = new Float64Array(m)
    this.e = new Float64Array(m)
  }
}

/**
 * Replaces each unit's B by (B⁻¹ + Ψ)⁻¹ for the level's own random terms and returns the sum of
 * log |I + Lᵀ Ψ L| over the units.
 */
export function applyOwnTerms(
  level: Pick<LevelCells, 'cellStart' | 'cellDesign' | 'terms'>,
  weights: Blocks,
  theta: ArrayLike<number>,
  w: Scratch,
): number {
  const { cellStart, terms } = level
  const nUnits = cellStart.length - 1
  const B = weights.blocks
  let total = 0
  for (const t of terms) total += theta[t.theta]
  let logDet = 0
  for (let u = 0; u < nUnits; u++) {
    const c0 = cellStart[u]
    const q = cellStart[u + 1] - c0
    const at = weights.offset[u]
    if (q === 1) {
      const b = B[at]
      B[at] = b / (1 + total * b)
      logDet += Math.log1p(total * b)
      continue
    }
    const { psi, L, PL, M, R, X } = w
    fillPsi(level, c0, q, theta, psi)
    choleskyInto(B, at, q, L)
    // PL = Ψ L, M = I + Lᵀ Ψ L
    for (let a = 0; a < q; a++)
      for (let b = 0; b < q; b++) {
        let s = 0
        for (let k = b; k < q; k++) s += psi[a * q + k] * L[k * q + b]
        PL[a * q + b] = s
      }
    for (let a = 0; a < q; a++)
      for (let b = 0; b <= a; b++) {
        let s = a === b ? 1 : 0
        for (let k = a; k < q; k++) s += L[k * q + a] * PL[k * q + b]
        M[a * q + b] = s
        M[b * q + a] = s
      }
    choleskyInto(M, 0, q, R)
    for (let a = 0; a < q; a++) logDet += 2 * Math.log(R[a * q + a])
    // B' = L M⁻¹ Lᵀ: solve M X = Lᵀ, then B' = L X.
    for (let a = 0; a < q; a++) for (let b = 0; b < q; b++) X[a * q + b] = L[b * q + a]
    solveCholeskyInto(R, q, X, q)
    for (let a = 0; a < q; a++)
      for (let b = 0; b <= a; b++) {
        let s1 = 0
        let s2 = 0
        for (let k = 0; k <= a; k++) s1 += L[a * q + k] * X[k * q + b]
        for (let k = 0; k <= b; k++) s2 += L[b * q + k] * X[k * q + a]
        const s = 0.5 * (s1 + s2)
        B[at + a * q + b] = s
        B[at + b * q + a] = s
      }
  }
  return logDet
}

/**
 * Ψ over the q cells of one unit (starting at cell c0): the covariance of the unit's own random
 * contributions to its cells, θ_level + Σ_F θ_F [the two cells share F's labels].
 */
export function fillPsi(
  level: Pick<LevelCells, 'cellDesign' | 'terms'>,
  c0: number,
  q: number,
  theta: ArrayLike<number>,
  psi: Float64Array,
): void {
  const { cellDesign, terms } = level
  psi.fill(0, 0, q * q)
  for (const t of terms) {
    const th = theta[t.theta]
    if (th === 0) continue
    for (let a = 0; a < q; a++) {
      const ga = t.groupOfCell[cellDesign[c0 + a]]
      for (let b = 0; b < q; b++) if (t.groupOfCell[cellDesign[c0 + b]] === ga) psi[a * q + b] += th
    }
  }
}

/**
 * Merges the cells of every child unit into its parent unit's cells (or, at the top, all
 * outermost units into one cell): the parents' B and μ, and the children's spread around them
 * added to W (lower triangle).
 */
export function mergeChildren(
  child: { nUnits: number; cellStart: Int32Array; parentCell: Int32Array },
  parent: { nUnits: number; cellStart: Int32Array; childStart: Int32Array | null } | null,
  mu: Float64Array,
  weights: Blocks,
  m: number,
  W: Float64Array,
  w: Scratch,
): { mu: Float64Array; weights: Blocks } {
  const nParents = parent ? parent.nUnits : 1
  const pCellStart = parent ? parent.cellStart : TOP_CELL
  const nParentCells = pCellStart[nParents]
  const offset = new Int32Array(nParents + 1)
  for (let u = 0; u < nParents; u++) {
    const q = pCellStart[u + 1] - pCellStart[u]
    offset[u + 1] = offset[u] + q * q
  }
  const blocks = new Float64Array(offset[nParents])
  const muP = new Float64Array(nParentCells * m)
  const { G, d, e, R } = w
  const childB = weights.blocks
  const parentCell = child.parentCell

  for (let u = 0; u < nParents; u++) {
    const u0 = parent ? parent.childStart![u] : 0
    const u1 = parent ? parent.childStart![u + 1] : child.nUnits
    const p0 = pCellStart[u]
    const base = parent ? p0 : 0
    const qP = pCellStart[u + 1] - p0
    const bp = offset[u]
    G.fill(0, 0, qP * m)
    for (let c = u0; c < u1; c++) {
      const k0 = child.cellStart[c]
      const q = child.cellStart[c + 1] - k0
      const at = weights.offset[c]
      for (let a = 0; a < q; a++) {
        const pa = parentCell[k0 + a] - base
        const src = (k0 + a) * m
        for (let b = 0; b < q; b++) {
          const wt = childB[at + a * q + b]
          const pb = parentCell[k0 + b] - base
          blocks[bp + pa * qP + pb] += wt
          const dst = pb * m
          for (let j = 0; j < m; j++) G[dst + j] += wt * mu[src + j]
        }
      }
    }
    // μ_P = G B_P⁻¹ (a row per parent cell here, as G is stored transposed).
    const mo = p0 * m
    if (qP === 1) {
      const b = blocks[bp]
      for (let j = 0; j < m; j++) muP[mo + j] = G[j] / b
    } else {
      choleskyInto(blocks, bp, qP, R)
      solveCholeskyInto(R, qP, G, m)
      for (let k = 0; k < qP * m; k++) muP[mo + k] = G[k]
    }
    for (let c = u0; c < u1; c++) {
      const k0 = child.cellStart[c]
      const q = child.cellStart[c + 1] - k0
      const at = weights.offset[c]
      for (let a = 0; a < q; a++) {
        const pa = parentCell[k0 + a] - base
        for (let j = 0; j < m; j++) d[j] = mu[(k0 + a) * m + j] - muP[mo + pa * m + j]
        for (let b = 0; b < q; b++) {
          const wt = childB[at + a * q + b]
          if (wt === 0) continue
          let other = d
          if (b !== a) {
            const pb = parentCell[k0 + b] - base
            for (let j = 0; j < m; j++) e[j] = mu[(k0 + b) * m + j] - muP[mo + pb * m + j]
            other = e
          }
          for (let j = 0; j < m; j++) {
            const dj = wt * d[j]
            for (let k = 0; k <= j; k++) W[j * m + k] += dj * other[k]
          }
        }
      }
    }
  }
  return { mu: muP, weights: { offset, blocks } }
}

const TOP_CELL = Int32Array.from([0, 1])
