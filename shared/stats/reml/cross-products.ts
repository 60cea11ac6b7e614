import type { NestedSufficientStats } from './sufficient-stats'

/**
 * XᵀX of the fixed columns (intercept first), on their original scale, from the cell summaries:
 * Σ_cells n x̄ x̄ᵀ + the within-cell scatter.
 *
 * @example
 * fixedCrossProducts(nestedSufficientStats(machinesDesign)) // → [[54, 18, 18], [18, 18, 0], [18, 0, 18]]
 */
export function fixedCrossProducts(stats: NestedSufficientStats): number[][] {
  const { m, p, shift, innerN, innerMean, within } = stats
  const xtx = Array.from({ length: p }, () => new Array<number>(p).fill(0))
  const x = new Float64Array(p)
  x[0] = 1
  for (let k = 0; k < innerN.length; k++) {
    for (let j = 1; j < p; j++) x[j] = innerMean[k * m + j - 1] + shift[j - 1]
    const n = innerN[k]
    for (let a = 0; a < p; a++) for (let b = 0; b < p; b++) xtx[a][b] += n * x[a] * x[b]
  }
  for (let a = 1; a < p; a++) for (let b = 1; b < p; b++) xtx[a][b] += within[(a - 1) * m + (b - 1)]
  return xtx
}
