import { EngineInputError } from '../engine-input-error'
import type { RandomLevel } from '../types'

/** Above this many (parent unit × label) slots a Map replaces the flat lookup table. */
const MAX_TABLE_SLOTS = 1 << 25

/**
 * Numbers the units of one level by (parent unit, label code), so the numbering does not depend
 * on row order and the children of a unit are contiguous. A flat table indexed by
 * parent × nLabels + code keeps the per-row work to one array read; a Map takes over when the
 * table would be large.
 */
export function nestLevel(
  name: string,
  codes: Int32Array,
  labels: string[],
  parent: RandomLevel | null,
): RandomLevel {
  const nObs = codes.length
  const nLabels = labels.length
  const nParents = parent ? parent.nUnits : 1
  const slots = nParents * nLabels
  if (slots > Number.MAX_SAFE_INTEGER)
    throw new EngineInputError(`The level "${name}" has too many units.`, name)
  const parentOf = parent ? parent.unitOfObs : null

  let unitOfObs: Int32Array
  let keys: number[]
  if (!parentOf && nLabels <= MAX_TABLE_SLOTS) {
    // Outermost level: a unit per label in use. When every label is in use (the usual case) the
    // codes already are the unit numbers and are shared rather than copied.
    const used = new Uint8Array(nLabels)
    for (let i = 0; i < nObs; i++) used[codes[i]] = 1
    keys = []
    const unitOfCode = new Int32Array(nLabels)
    for (let k = 0; k < nLabels; k++) if (used[k]) unitOfCode[k] = keys.push(k) - 1
    if (keys.length === nLabels) unitOfObs = codes
    else {
      unitOfObs = new Int32Array(nObs)
      for (let i = 0; i < nObs; i++) unitOfObs[i] = unitOfCode[codes[i]]
    }
  } else if (slots <= MAX_TABLE_SLOTS) {
    // unitOfObs first holds each row's slot, then is overwritten with the slot's unit number.
    // Only nested levels come here: an outermost level this small took the branch above.
    const parents = parentOf!
    unitOfObs = new Int32Array(nObs)
    const table = new Int32Array(slots).fill(-1)
    for (let i = 0; i < nObs; i++) {
      const slot = parents[i] * nLabels + codes[i]
      unitOfObs[i] = slot
      table[slot] = 0
    }
    keys = []
    for (let k = 0; k < slots; k++) if (table[k] === 0) table[k] = keys.push(k) - 1
    for (let i = 0; i < nObs; i++) unitOfObs[i] = table[unitOfObs[i]]
  } else {
    unitOfObs = new Int32Array(nObs)
    const index = new Map<number, number>()
    const slotOf = (i: number) => (parentOf ? parentOf[i] * nLabels + codes[i] : codes[i])
    for (let i = 0; i < nObs; i++) index.set(slotOf(i), 0)
    keys = [...index.keys()].sort((a, b) => a - b)
    keys.forEach((k, u) => index.set(k, u))
    for (let i = 0; i < nObs; i++) unitOfObs[i] = index.get(slotOf(i))!
  }

  const nUnits = keys.length
  const parentOfUnit = new Int32Array(nUnits)
  const unitLabels: string[] = new Array(nUnits)
  for (let u = 0; u < nUnits; u++) {
    const p = Math.floor(keys[u] / nLabels)
    const label = labels[keys[u] - p * nLabels]
    parentOfUnit[u] = parent ? p : -1
    unitLabels[u] = parent ? `${parent.unitLabels[p]}/${label}` : label
  }
  return { name, nUnits, unitOfObs, parentOfUnit, unitLabels }
}

/** Refuses a level that cannot be told apart from its parent or from the residual. */
export function checkLevelSize(level: RandomLevel, parent: RandomLevel | null, nObs: number): void {
  if (!parent && level.nUnits < 2) {
    throw new EngineInputError(
      `The level "${level.name}" has only ${level.nUnits} unit; at least 2 are needed.`,
      level.name,
    )
  }
  if (parent && level.nUnits <= parent.nUnits) {
    throw new EngineInputError(
      `Each "${parent.name}" holds a single "${level.name}", so the two levels cannot be told apart; leave one out.`,
      level.name,
    )
  }
  if (level.nUnits >= nObs) {
    throw new EngineInputError(
      `Each "${level.name}" unit has a single observation, so this level cannot be told apart from the residual; leave it out.`,
      level.name,
    )
  }
}

/** Labels of a nested level that occur under more than one parent unit (the data relied on the path). */
export function labelsUnderSeveralParents(level: RandomLevel, codes: Int32Array, labels: string[]): string[] {
  if (level.parentOfUnit[0] === -1) return []
  const codeOfUnit = new Int32Array(level.nUnits)
  for (let i = 0; i < codes.length; i++) codeOfUnit[level.unitOfObs[i]] = codes[i]
  const parentsPerCode = new Int32Array(labels.length)
  for (let u = 0; u < level.nUnits; u++) parentsPerCode[codeOfUnit[u]]++
  const repeated: string[] = []
  for (let c = 0; c < labels.length; c++) if (parentsPerCode[c] > 1) repeated.push(labels[c])
  return repeated
}
