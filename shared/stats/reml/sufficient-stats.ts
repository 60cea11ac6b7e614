import type { NestedDesign } from '../types'

/** The cells of one given level: each unit split by the design cells it holds. */
export interface LevelCells {
  nUnits: number
  /** Cells of unit u are cellStart[u] … cellStart[u+1]−1 (ordered by design cell). */
  cellStart: Int32Array
  /** Design cell of each cell. */
  cellDesign: Int32Array
  /** Index of each cell's parent cell in the next level out (the single top cell 0 for the outermost level). */
  parentCell: Int32Array
  /** Children of unit u in the next level in: childStart[u] … childStart[u+1]−1 (innermost level: null). */
  childStart: Int32Array | null
  /** The random terms of this level: the index of each in θ, and per design cell its group within a unit. */
  terms: { theta: number; groupOfCell: Int32Array }[]
}

/**
 * Everything a REML evaluation needs, at cell level: the rows are read once here and never again.
 *
 * Coordinates: the model columns are [1, x_1 … x_{p−1}, y] (x: factor dummies, covariates and
 * interaction dummies in the design's order). The leading 1 is implicit; the remaining m = p
 * columns are stored, each shifted by `shift` (means of y and the covariates). Each innermost
 * cell (innermost unit × design cell) keeps its size and mean vector; the scatter of the rows
 * around their own cell's mean is summed over all innermost cells (it never changes with θ).
 */
export interface NestedSufficientStats {
  nObs: number
  /** Number of fixed effects (intercept included). */
  p: number
  /** Stored columns per cell: p − 1 fixed columns, then y. */
  m: number
  /** Value subtracted from each stored column before summing (added back to the fixed effects). */
  shift: Float64Array
  /** Number of random terms (length of θ). */
  nTheta: number
  /** Given levels, outermost first. */
  levels: LevelCells[]
  /** Innermost cell of each observation. */
  cellOfObs: Int32Array
  /** Observations per innermost cell. */
  innerN: Float64Array
  /** Mean vector (m entries) of each innermost cell, row-major. */
  innerMean: Float64Array
  /** Σ over innermost cells of Σ_rows (c − c̄_cell)(c − c̄_cell)ᵀ, m × m row-major. */
  within: Float64Array
}

const cache = new WeakMap<NestedDesign, NestedSufficientStats>()

/** Above this many (unit × design cell) slots a Map numbers the cells instead of a flat table. */
const MAX_TABLE_SLOTS = 1 << 25

/**
 * Per-cell sufficient statistics of a nested design: sizes, means of the model columns, and the
 * pooled within-cell scatter matrix. Two passes over typed arrays (means, then deviations from
 * them) so that large offsets in y or a covariate do not cost precision. Factor dummies are
 * constant within a cell, so only y and the covariates are read row by row. Cached per design.
 *
 * Source: the sums of squares and products of Henderson's mixed-model equations, organised by
 * nested unit (Searle, Casella & McCulloch 1992, Variance Components, ch. 6).
 *
 * Guard errors: none (the design was checked by prepareNestedDesign); throws if units are not
 * numbered by parent, which prepareNestedDesign guarantees.
 *
 * @example
 * nestedSufficientStats(design).innerN // → Float64Array of observations per innermost cell
 */
export function nestedSufficientStats(design: NestedDesign): NestedSufficientStats {
  const hit = cache.get(design)
  if (hit) return hit
  const stats = compute(design)
  cache.set(design, stats)
  return stats
}

function compute(design: NestedDesign): NestedSufficientStats {
  const { nObs, y, randomLevels, cells, covariates, fixed } = design
  const K = randomLevels.length
  const p = fixed.columns.length
  const m = p
  const nDesign = cells.labels.length
  const yCol = m - 1
  const covCols = fixed.covariateColumns.map((c) => c - 1)

  const shift = new Float64Array(m)
  shift[yCol] = mean(y)
  covariates.forEach((c, j) => (shift[covCols[j]] = c.mean))

  // Innermost cells: (innermost unit, design cell), numbered unit by unit.
  const inner = randomLevels[K - 1]
  const innerCells = numberCells(inner.nUnits, nDesign, (mark) => {
    for (let i = 0; i < nObs; i++) mark(inner.unitOfObs[i], cells.codes[i])
  })
  const cellOfObs = new Int32Array(nObs)
  for (let i = 0; i < nObs; i++) cellOfObs[i] = innerCells.cellOf(inner.unitOfObs[i], cells.codes[i])
  const nInner = innerCells.cellDesign.length

  // Pass 1: sizes and sums of the columns that vary by row (covariates, y).
  const rowCols = [...covCols, yCol]
  const values = [...covariates.map((c) => c.values), y]
  const n = new Float64Array(nInner)
  const innerMean = new Float64Array(nInner * m)
  for (let i = 0; i < nObs; i++) n[cellOfObs[i]]++
  rowCols.forEach((col, j) => {
    const v = values[j]
    const s = shift[col]
    for (let i = 0; i < nObs; i++) innerMean[cellOfObs[i] * m + col] += v[i] - s
  })
  for (let k = 0; k < nInner; k++) {
    for (const col of rowCols) innerMean[k * m + col] /= n[k]
    const row = innerCells.cellDesign[k] * p
    for (let j = 1; j < p; j++)
      if (!covCols.includes(j - 1)) innerMean[k * m + j - 1] = fixed.cellRows[row + j]
  }

  // Pass 2: scatter of the row-varying columns around their cell means.
  const within = new Float64Array(m * m)
  const r = rowCols.length
  const dev = new Float64Array(r)
  for (let i = 0; i < nObs; i++) {
    const base = cellOfObs[i] * m
    for (let a = 0; a < r; a++) dev[a] = values[a][i] - shift[rowCols[a]] - innerMean[base + rowCols[a]]
    for (let a = 0; a < r; a++) {
      const da = dev[a]
      for (let b = 0; b <= a; b++) within[rowCols[a] * m + rowCols[b]] += da * dev[b]
    }
  }
  for (let a = 0; a < r; a++)
    for (let b = 0; b < a; b++) within[rowCols[b] * m + rowCols[a]] = within[rowCols[a] * m + rowCols[b]]

  const levels = buildLevels(design, innerCells)
  return { nObs, p, m, shift, nTheta: design.terms.length, levels, cellOfObs, innerN: n, innerMean, within }
}

function mean(v: Float64Array): number {
  let s = 0
  for (let i = 0; i < v.length; i++) s += v[i]
  return s / v.length
}

interface NumberedCells {
  cellStart: Int32Array
  cellDesign: Int32Array
  cellOf: (unit: number, design: number) => number
}

/** Numbers the (unit, design cell) pairs that `visit` marks, unit by unit, design cells in order. */
function numberCells(
  nUnits: number,
  nDesign: number,
  visit: (mark: (unit: number, design: number) => void) => void,
): NumberedCells {
  const cellStart = new Int32Array(nUnits + 1)
  const designs: number[] = []
  if (nUnits * nDesign <= MAX_TABLE_SLOTS) {
    const table = new Int32Array(nUnits * nDesign).fill(-1)
    visit((u, d) => (table[u * nDesign + d] = 0))
    for (let u = 0; u < nUnits; u++) {
      for (let d = 0; d < nDesign; d++) {
        if (table[u * nDesign + d] === 0) table[u * nDesign + d] = designs.push(d) - 1
      }
      cellStart[u + 1] = designs.length
    }
    return { cellStart, cellDesign: Int32Array.from(designs), cellOf: (u, d) => table[u * nDesign + d] }
  }
  const index = new Map<number, number>()
  visit((u, d) => index.set(u * nDesign + d, 0))
  const keys = [...index.keys()].sort((a, b) => a - b)
  keys.forEach((key, k) => {
    index.set(key, k)
    const u = Math.floor(key / nDesign)
    designs.push(key - u * nDesign)
    cellStart[u + 1] = k + 1
  })
  for (let u = 1; u <= nUnits; u++) if (cellStart[u] < cellStart[u - 1]) cellStart[u] = cellStart[u - 1]
  return { cellStart, cellDesign: Int32Array.from(designs), cellOf: (u, d) => index.get(u * nDesign + d)! }
}

/** Cells of every level (from the innermost outwards), their parents, children and terms. */
function buildLevels(design: NestedDesign, innerCells: NumberedCells): LevelCells[] {
  const { randomLevels, cells } = design
  const K = randomLevels.length
  const nDesign = cells.labels.length
  const numbered: NumberedCells[] = new Array(K)
  numbered[K - 1] = innerCells
  const levels: LevelCells[] = new Array(K)
  for (let l = K - 1; l >= 0; l--) {
    const level = randomLevels[l]
    const own = numbered[l]
    let parentCell: Int32Array
    if (l === 0) parentCell = new Int32Array(own.cellDesign.length)
    else {
      const parentOf = level.parentOfUnit
      const outer = numberCells(randomLevels[l - 1].nUnits, nDesign, (mark) => {
        for (let u = 0; u < level.nUnits; u++)
          for (let k = own.cellStart[u]; k < own.cellStart[u + 1]; k++) mark(parentOf[u], own.cellDesign[k])
      })
      numbered[l - 1] = outer
      parentCell = new Int32Array(own.cellDesign.length)
      for (let u = 0; u < level.nUnits; u++)
        for (let k = own.cellStart[u]; k < own.cellStart[u + 1]; k++)
          parentCell[k] = outer.cellOf(parentOf[u], own.cellDesign[k])
    }
    levels[l] = {
      nUnits: level.nUnits,
      cellStart: own.cellStart,
      cellDesign: own.cellDesign,
      parentCell,
      childStart: l + 1 < K ? childStarts(level.nUnits, randomLevels[l + 1].parentOfUnit) : null,
      terms: design.terms.flatMap((term, t) =>
        term.level === l ? [{ theta: t, groupOfCell: groupsOfCells(cells.levelsOf, term.factors) }] : [],
      ),
    }
  }
  return levels
}

function childStarts(nParents: number, parentOf: Int32Array): Int32Array {
  const start = new Int32Array(nParents + 1)
  for (let c = 0; c < parentOf.length; c++) {
    if (c > 0 && parentOf[c] < parentOf[c - 1]) throw new Error('units must be numbered by parent')
    start[parentOf[c] + 1] = c + 1
  }
  for (let u = 1; u < start.length; u++) if (start[u] < start[u - 1]) start[u] = start[u - 1]
  return start
}

/** Per design cell, its group under a term crossed with `factors` (all cells alike for the level's own term). */
function groupsOfCells(levelsOf: number[][], factors: number[]): Int32Array {
  const seen = new Map<string, number>()
  return Int32Array.from(levelsOf, (codes) => {
    const key = factors.map((f) => codes[f]).join(',')
    if (!seen.has(key)) seen.set(key, seen.size)
    return seen.get(key)!
  })
}
