import {
  applyOwnTerms,
  diagonalBlocks,
  fillPsi,
  mergeChildren,
  type Blocks,
  type Scratch,
} from '../reml/nested-blocks'
import type { LevelCells } from '../reml/sufficient-stats'

export interface ConditionalModes {
  /**
   * Per level, per cell of that level: the unit's own contribution b̂ to the cell and v with
   * b̂ = Ψ v (so the penalty of any mix of two solutions is known: Σ vᵀ b̂).
   */
  perLevel: { v: Float64Array; b: Float64Array }[]
  /** Total random contribution to each innermost cell's linear predictor (all levels summed). */
  innerEffect: Float64Array
  /** Σ over units of b̂ᵀ Ψ⁺ b̂: the penalty ‖u‖² of the spherical random effects. */
  penalty: number
  /** log |I + Ψ Zᵀ W Z|, lme4's log |L|². */
  logDet: number
}

/**
 * The conditional modes (BLUPs) of the random intercepts of a nested model with known
 * precision weights, given each innermost cell's total weight W and weighted mean working
 * residual r̄ (fixed part already removed): the penalised weighted least-squares step of PIRLS.
 *
 * Bottom-up, every unit's cell means μ and B are formed as in the REML criterion (the data of
 * the unit with its descendants' random intercepts integrated out); top-down, each unit's own
 * contribution to its cells is b̂ = Ψ (Ψ + B⁻¹)⁻¹ (μ − a) = Ψ B' (μ − a), a being what its
 * ancestors contribute, and its penalty b̂ᵀ Ψ⁺ b̂ = (B'(μ − a))ᵀ b̂ needs no inverse of Ψ.
 *
 * Source: Henderson (1975), Biometrics 31:423 (BLUP); Bates, Mächler, Bolker & Walker (2015),
 * J Stat Softw 67(1), §5.3 (PIRLS); Searle, Casella & McCulloch (1992), ch. 7.
 *
 * @example
 * conditionalModes(levels, weights, residuals, [0.4], scratch).innerEffect // one value per innermost cell
 */
export function conditionalModes(
  levels: LevelCells[],
  innerW: Float64Array,
  innerR: Float64Array,
  theta: ArrayLike<number>,
  scratch: Scratch,
): ConditionalModes {
  const K = levels.length
  const means: Float64Array[] = new Array(K)
  const after: Blocks[] = new Array(K)
  const dummy = new Float64Array(1)
  let logDet = 0
  let mu = innerR
  let weights = diagonalBlocks(levels[K - 1].cellStart, innerW)
  for (let l = K - 1; l >= 0; l--) {
    if (l < K - 1) {
      const merged = mergeChildren(levels[l + 1], levels[l], mu, weights, 1, dummy, scratch)
      mu = merged.mu
      weights = merged.weights
    }
    means[l] = mu
    logDet += applyOwnTerms(levels[l], weights, theta, scratch)
    after[l] = weights
  }

  let penalty = 0
  let ancestors = new Float64Array(levels[0].cellDesign.length)
  const perLevel: ConditionalModes['perLevel'] = []
  for (let l = 0; l < K; l++) {
    const level = levels[l]
    const own = new Float64Array(level.cellDesign.length)
    const ownV = new Float64Array(level.cellDesign.length)
    const nUnits = level.cellStart.length - 1
    for (let u = 0; u < nUnits; u++) {
      const c0 = level.cellStart[u]
      const q = level.cellStart[u + 1] - c0
      const at = after[l].offset[u]
      const Bp = after[l].blocks
      // v = B' (μ − a), b̂ = Ψ v
      const v = scratch.X
      for (let a = 0; a < q; a++) {
        let s = 0
        for (let b = 0; b < q; b++) s += Bp[at + a * q + b] * (means[l][c0 + b] - ancestors[c0 + b])
        v[a] = s
        ownV[c0 + a] = s
      }
      fillPsi(level, c0, q, theta, scratch.psi)
      for (let a = 0; a < q; a++) {
        let s = 0
        for (let b = 0; b < q; b++) s += scratch.psi[a * q + b] * v[b]
        own[c0 + a] = s
        penalty += v[a] * s
      }
    }
    perLevel.push({ v: ownV, b: own })
    const total = new Float64Array(level.cellDesign.length)
    for (let k = 0; k < total.length; k++) total[k] = ancestors[k] + own[k]
    if (l + 1 < K) {
      const child = levels[l + 1]
      const next = new Float64Array(child.cellDesign.length)
      for (let k = 0; k < next.length; k++) next[k] = total[child.parentCell[k]]
      ancestors = next
    } else ancestors = total
  }
  return { perLevel, innerEffect: ancestors, penalty, logDet }
}
