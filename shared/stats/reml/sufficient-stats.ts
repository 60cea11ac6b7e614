import type { NestedDesign } from '../types'

/**
 * Everything a REML evaluation needs, at unit level: the rows are read once here and never again.
 *
 * Coordinates: the model columns are [1, d_1 … d_{p−1}, y] with d_j the indicator of the j-th
 * non-reference condition. The leading 1 is implicit; the remaining m = p columns (dummies then y)
 * are stored. Each innermost unit keeps its size and its mean vector; the scatter of the rows
 * around their own unit's mean is summed over all innermost units (it never changes with θ).
 */
export interface NestedSufficientStats {
  nObs: number
  /** Number of fixed effects (intercept + non-reference conditions). */
  p: number
  /** Stored columns per unit: p − 1 dummies, then y. */
  m: number
  /** Overall mean subtracted from y before summing (added back to the intercept). */
  shift: number
  /** Number of random levels K. */
  nLevels: number
  /** Units per random level, outermost first. */
  nUnits: number[]
  /** For levels 0 … K−2: childStart[u] … childStart[u+1]−1 are the children of unit u in level l+1. */
  childStart: Int32Array[]
  /** Observations per innermost unit. */
  innerN: Float64Array
  /** Mean vector (m entries) of each innermost unit, row-major. */
  innerMean: Float64Array
  /** Σ over innermost units of Σ_rows (c − c̄_unit)(c − c̄_unit)ᵀ, m × m row-major. */
  within: Float64Array
}

const cache = new WeakMap<NestedDesign, NestedSufficientStats>()

/**
 * Per-innermost-unit sufficient statistics of a nested design: sizes, means of the model
 * columns, and the pooled within-unit scatter matrix. Two passes over typed arrays (means, then
 * deviations from them) so that large offsets in y do not cost precision. Cached per design.
 *
 * Source: the sums of squares and products of Henderson's mixed-model equations, organised by
 * nested unit (Searle, Casella & McCulloch 1992, Variance Components, ch. 6).
 *
 * Guard errors: none (the design was checked by prepareNestedDesign); throws if units are not
 * numbered by parent, which prepareNestedDesign guarantees.
 *
 * @example
 * nestedSufficientStats(design).innerN // → Float64Array of observations per innermost unit
 */
export function nestedSufficientStats(design: NestedDesign): NestedSufficientStats {
  const hit = cache.get(design)
  if (hit) return hit
  const stats = compute(design)
  cache.set(design, stats)
  return stats
}

function compute(design: NestedDesign): NestedSufficientStats {
  const { nObs, y, randomLevels } = design
  const K = randomLevels.length
  const inner = randomLevels[K - 1]
  const unitOf = inner.unitOfObs
  const nU = inner.nUnits
  const k = design.condition ? design.condition.labels.length : 1
  const cond = design.condition ? design.condition.codes : null
  const p = k
  const m = p

  let total = 0
  for (let i = 0; i < nObs; i++) total += y[i]
  const shift = total / nObs

  const n = new Float64Array(nU)
  const sumY = new Float64Array(nU)
  const count = new Float64Array(nU * k)
  for (let i = 0; i < nObs; i++) {
    const u = unitOf[i]
    n[u] += 1
    sumY[u] += y[i] - shift
    if (cond) count[u * k + cond[i]] += 1
  }
  const meanY = new Float64Array(nU)
  for (let u = 0; u < nU; u++) meanY[u] = sumY[u] / n[u]

  const ss = new Float64Array(nU)
  const sumDev = new Float64Array(nU * k)
  for (let i = 0; i < nObs; i++) {
    const u = unitOf[i]
    const d = y[i] - shift - meanY[u]
    ss[u] += d * d
    if (cond) sumDev[u * k + cond[i]] += d
  }

  const innerMean = new Float64Array(nU * m)
  const within = new Float64Array(m * m)
  const yy = m - 1
  for (let u = 0; u < nU; u++) {
    const base = u * m
    for (let j = 1; j < k; j++) {
      const cj = count[u * k + j]
      innerMean[base + j - 1] = cj / n[u]
      for (let l = 1; l < k; l++) {
        const w = (j === l ? cj : 0) - (cj * count[u * k + l]) / n[u]
        within[(j - 1) * m + (l - 1)] += w
      }
      within[(j - 1) * m + yy] += sumDev[u * k + j]
      within[yy * m + (j - 1)] += sumDev[u * k + j]
    }
    innerMean[base + yy] = meanY[u]
    within[yy * m + yy] += ss[u]
  }

  const childStart: Int32Array[] = []
  for (let l = 0; l < K - 1; l++) {
    const parentOf = randomLevels[l + 1].parentOfUnit
    const start = new Int32Array(randomLevels[l].nUnits + 1)
    for (let c = 0; c < parentOf.length; c++) {
      if (c > 0 && parentOf[c] < parentOf[c - 1]) throw new Error('units must be numbered by parent')
      start[parentOf[c] + 1] = c + 1
    }
    for (let u = 1; u < start.length; u++) if (start[u] < start[u - 1]) start[u] = start[u - 1]
    childStart.push(start)
  }

  return {
    nObs,
    p,
    m,
    shift,
    nLevels: K,
    nUnits: randomLevels.map((l) => l.nUnits),
    childStart,
    innerN: n,
    innerMean,
    within,
  }
}
