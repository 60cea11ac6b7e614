/**
 * Units keyed by their full path. Labs reuse labels ("m01" in every lab), so a unit at depth d is
 * the combination of its own label and its parent unit, not the label alone.
 */

/**
 * A column as per-row codes into a label list; -1 marks a missing label (the row belongs to no unit).
 * Always an Int32Array, so the loops below stay monomorphic and fast on a million rows.
 */
export interface CodedColumn {
  name: string
  codes: Int32Array
  labels: readonly string[]
}

export interface PathLevel {
  column: CodedColumn
  /** Per row: the id of its unit at this depth, -1 when a label on its path is missing. */
  ids: Int32Array
  /** Number of distinct units. */
  count: number
  /** Per unit: the id of its parent unit one level up (0 for the outermost level, which has one notional parent). */
  parent: Int32Array
  /** Per unit: its label code in this column. */
  label: Int32Array
}

const DENSE_LIMIT = 1 << 22

/**
 * Splits the units of `parent` (or the whole table when null) by the labels of `column`, in one
 * pass over the rows. Ids are dense, in order of first appearance.
 *
 * @example
 * // lab: A A B B, animal: m1 m2 m1 m1 → units A·m1, A·m2, B·m1 (count 3), ids [0, 1, 2, 2]
 */
export function extendPaths(parent: PathLevel | null, column: CodedColumn, rowCount: number): PathLevel {
  const labelCount = Math.max(column.labels.length, 1)
  const parentCount = parent ? parent.count : 1
  const ids = new Int32Array(rowCount)
  // At most one unit per row or per (parent, label) pair; typed arrays avoid a million pushes.
  const capacity = Math.min(rowCount, parentCount * labelCount)
  const parentOf = new Int32Array(capacity)
  const labelOf = new Int32Array(capacity)
  const codes = column.codes
  // The outermost level has one notional parent: a shared zero array would cost a row-sized allocation.
  const parentIds = parent ? parent.ids : null
  let count = 0
  if (parentCount * labelCount <= DENSE_LIMIT) {
    const table = new Int32Array(parentCount * labelCount).fill(-1)
    for (let r = 0; r < rowCount; r++) {
      const p = parentIds === null ? 0 : parentIds[r]
      const code = codes[r]
      if (p < 0 || code < 0) {
        ids[r] = -1
        continue
      }
      const key = p * labelCount + code
      let id = table[key]
      if (id === -1) {
        id = count++
        parentOf[id] = p
        labelOf[id] = code
        table[key] = id
      }
      ids[r] = id
    }
  } else {
    const map = new Map<number, number>()
    for (let r = 0; r < rowCount; r++) {
      const p = parentIds === null ? 0 : parentIds[r]
      const code = codes[r]
      if (p < 0 || code < 0) {
        ids[r] = -1
        continue
      }
      const key = p * labelCount + code
      let id = map.get(key)
      if (id === undefined) {
        id = count++
        parentOf[id] = p
        labelOf[id] = code
        map.set(key, id)
      }
      ids[r] = id
    }
  }
  return { column, ids, count, parent: parentOf.slice(0, count), label: labelOf.slice(0, count) }
}

/**
 * How many units `column` would split `parent` into, without building the per-row ids: the
 * suggestion tries every candidate column this way and builds paths only for the ones it keeps.
 */
export function countPaths(parent: PathLevel | null, column: CodedColumn, rowCount: number): number {
  const labelCount = Math.max(column.labels.length, 1)
  const parentCount = parent ? parent.count : 1
  const codes = column.codes
  const parentIds = parent ? parent.ids : null
  let count = 0
  if (parentCount * labelCount <= DENSE_LIMIT) {
    const seen = new Uint8Array(parentCount * labelCount)
    for (let r = 0; r < rowCount; r++) {
      const p = parentIds === null ? 0 : parentIds[r]
      const code = codes[r]
      if (p < 0 || code < 0) continue
      const key = p * labelCount + code
      if (seen[key] === 0) {
        seen[key] = 1
        count++
      }
    }
    return count
  }
  const seen = new Set<number>()
  for (let r = 0; r < rowCount; r++) {
    const p = parentIds === null ? 0 : parentIds[r]
    const code = codes[r]
    if (p >= 0 && code >= 0) seen.add(p * labelCount + code)
  }
  return seen.size
}

/** Paths for each level, outermost first. */
export function buildPaths(levels: readonly CodedColumn[], rowCount: number): PathLevel[] {
  const out: PathLevel[] = []
  let parent: PathLevel | null = null
  for (const column of levels) {
    parent = extendPaths(parent, column, rowCount)
    out.push(parent)
  }
  return out
}

export interface Spread {
  min: number
  median: number
  max: number
}

export function spreadOf(values: ArrayLike<number>): Spread | null {
  if (values.length === 0) return null
  const sorted = Float64Array.from(values).sort()
  const mid = sorted.length >> 1
  const median = sorted.length % 2 ? sorted[mid] : (sorted[mid - 1] + sorted[mid]) / 2
  return { min: sorted[0], median, max: sorted[sorted.length - 1] }
}

/** Units per parent unit (for a level below the outermost). */
export function childrenPerParent(level: PathLevel, parentCount: number): Spread | null {
  const counts = new Int32Array(parentCount)
  for (let u = 0; u < level.count; u++) counts[level.parent[u]]++
  return spreadOf(counts)
}

/** Rows per unit of a level. */
export function rowsPerUnit(level: PathLevel): Spread | null {
  const counts = new Int32Array(level.count)
  for (let r = 0; r < level.ids.length; r++) if (level.ids[r] >= 0) counts[level.ids[r]]++
  return spreadOf(counts)
}

/** Labels that name units under more than one parent ("m01" in two labs), up to `limit`, in label order. */
/** How many labels of this level appear under more than one parent unit (reusedLabels lists the first few). */
export function reusedLabelCount(level: PathLevel): number {
  const unitsPerLabel = new Int32Array(level.column.labels.length)
  for (let u = 0; u < level.count; u++) unitsPerLabel[level.label[u]]++
  let count = 0
  for (const n of unitsPerLabel) if (n > 1) count++
  return count
}

export function reusedLabels(level: PathLevel, limit = 5): string[] {
  const unitsPerLabel = new Int32Array(level.column.labels.length)
  for (let u = 0; u < level.count; u++) unitsPerLabel[level.label[u]]++
  const out: string[] = []
  for (let code = 0; code < unitsPerLabel.length && out.length < limit; code++) {
    if (unitsPerLabel[code] > 1) out.push(level.column.labels[code])
  }
  return out
}

/**
 * Index of the outermost level whose every unit has a single condition value, or -1 when the
 * condition varies inside units of every level. Rows without a condition value are ignored.
 */
export function conditionDepth(paths: readonly PathLevel[], condition: CodedColumn): number {
  const codes = condition.codes
  for (let d = 0; d < paths.length; d++) {
    const level = paths[d]
    const seen = new Int32Array(level.count).fill(-1)
    let constant = true
    for (let r = 0; r < level.ids.length; r++) {
      const id = level.ids[r]
      const c = codes[r]
      if (id < 0 || c < 0) continue
      if (seen[id] === -1) seen[id] = c
      else if (seen[id] !== c) {
        constant = false
        break
      }
    }
    if (constant) return d
  }
  return -1
}
