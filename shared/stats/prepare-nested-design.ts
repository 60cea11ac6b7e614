import { EngineInputError } from './engine-input-error'
import type { ConditionCoding, Factor, NestedColumns, NestedDesign, RandomLevel } from './types'

export interface PrepareNestedDesignOptions {
  /** Label of the condition to compare the others against; default: the first label of the condition factor. */
  reference?: string
}

/** Above this many (parent unit × label) slots a Map replaces the flat lookup table. */
const MAX_TABLE_SLOTS = 1 << 25

/**
 * Turns raw columns into a nested design the mixed model can fit: drops rows whose response is
 * missing, keys every unit by its full path (animal "3" of lab A is not animal "3" of lab B),
 * codes the condition against a reference and finds the level that carries it.
 *
 * Units of each level are numbered by (parent unit, label order), so the numbering does not
 * depend on row order, and the children of a unit are contiguous. Labels that occur under more
 * than one parent are reported in `implicitNesting` (the data relied on the path to tell them apart).
 *
 * Condition placement: a level's units "carry" the condition when each unit holds one condition
 * only. `conditionLevel` is the outermost such level. When even the innermost given level mixes
 * conditions, a random level "<innermost>:condition" (unit × condition) is appended, as in the
 * lme4 model `y ~ condition + (1|lab) + (1|lab:animal) + (1|lab:animal:condition)`. It is left
 * out when each unit × condition cell holds a single observation, because it would then be the
 * residual itself.
 *
 * Reference condition: `opts.reference`, else the first label of the condition factor (a table
 * reader lists labels in order of first appearance). Labels are ordered reference first, then
 * the others in the factor's order; the fixed effects are coded against the reference.
 *
 * Source: the model of Pinheiro & Bates (2000), Mixed-Effects Models in S and S-PLUS, ch. 2
 * (nested grouping factors keyed by their path, as `lab/animal` in nlme/lme4).
 *
 * Guard errors (EngineInputError): no level; columns of unequal length; an infinite response;
 * a code outside its label list; fewer than 2 observations; fewer than 2 units at the outermost
 * level; a level with no more units than its parent (one child per unit: inseparable levels);
 * a level with one observation per unit (inseparable from the residual); a condition with fewer
 * than 2 labels, a label without observations, or an unknown reference; duplicate level names.
 *
 * @example
 * prepareNestedDesign({
 *   responseName: 'length',
 *   response: Float64Array.from([1, 2, 3, 4, NaN]),
 *   levels: [{ name: 'lab', labels: ['A', 'B'], codes: Int32Array.from([0, 0, 1, 1, 1]) }],
 * })
 * // → { nObs: 4, nDropped: 1, randomLevels: [{ name: 'lab', nUnits: 2, unitLabels: ['A', 'B'], … }], … }
 */
export function prepareNestedDesign(
  columns: NestedColumns,
  opts: PrepareNestedDesignOptions = {},
): NestedDesign {
  const { response, levels } = columns
  if ((columns.factors?.length ?? 0) > 1 || (columns.covariates?.length ?? 0) > 0)
    throw new EngineInputError('Two condition factors and covariates are not supported yet.')
  const condition = columns.factors?.[0] ?? null
  const nRows = response.length
  if (levels.length === 0) throw new EngineInputError('At least one nesting level (e.g. animal) is needed.')
  checkNames(levels, condition)
  for (const f of condition ? [...levels, condition] : levels) checkFactor(f, nRows)

  let nObs = 0
  for (let r = 0; r < nRows; r++) {
    const v = response[r]
    if (v !== v) continue // NaN: missing response
    if (v === Infinity || v === -Infinity) {
      throw new EngineInputError(
        `The response "${columns.responseName}" is infinite in row ${r + 1}.`,
        columns.responseName,
      )
    }
    nObs++
  }
  const nDropped = nRows - nObs
  if (nObs < 2) {
    throw new EngineInputError(
      `Only ${nObs} row(s) have a response value; at least 2 are needed.`,
      columns.responseName,
    )
  }
  // With nothing dropped (the usual case) the design shares the input's columns instead of copying
  // them: fresh memory is slow to touch, and on a million rows the copies cost more than the fit.
  let rowOfObs: Int32Array | null = null
  if (nDropped > 0) {
    rowOfObs = new Int32Array(nObs)
    for (let r = 0, i = 0; r < nRows; r++) if (response[r] === response[r]) rowOfObs[i++] = r
  }
  const keep = <T extends Float64Array | Int32Array>(column: T, make: (n: number) => T): T => {
    if (!rowOfObs) return column
    const kept = make(nObs)
    for (let i = 0; i < nObs; i++) kept[i] = column[rowOfObs[i]]
    return kept
  }
  const y = keep(response, (n) => new Float64Array(n))

  const randomLevels: RandomLevel[] = []
  const implicitNesting: { level: string; labels: string[] }[] = []
  let parent: RandomLevel | null = null
  for (const factor of levels) {
    const codes = keep(factor.codes, (n) => new Int32Array(n))
    const level = nestLevel(factor.name, codes, factor.labels, parent, false)
    checkLevelSize(level, parent, nObs)
    const repeated = labelsUnderSeveralParents(level, codes, factor.labels)
    if (repeated.length > 0) implicitNesting.push({ level: factor.name, labels: repeated })
    randomLevels.push(level)
    parent = level
  }

  let coding: ConditionCoding | null = null
  let conditionLevel: string | null = null
  if (condition) {
    coding = codeCondition(
      condition,
      keep(condition.codes, (n) => new Int32Array(n)),
      opts.reference,
    )
    const mixing = randomLevels.map((level) => unitsMixConditions(level, coding!.codes))
    const carrying = mixing.indexOf(false)
    conditionLevel = carrying === -1 ? null : randomLevels[carrying].name
    const innermost = randomLevels[randomLevels.length - 1]
    if (mixing[mixing.length - 1]) {
      const cell = nestLevel(`${innermost.name}:condition`, coding.codes, coding.labels, innermost, true)
      if (cell.nUnits < nObs) randomLevels.push(cell)
    }
  }

  return {
    responseName: columns.responseName,
    nObs,
    y,
    levelNames: levels.map((f) => f.name),
    randomLevels,
    condition: coding,
    conditionLevel,
    implicitNesting,
    nDropped,
  }
}

function checkNames(levels: Factor[], condition: Factor | null): void {
  const seen = new Set<string>()
  for (const f of condition ? [...levels, condition] : levels) {
    if (f.name === 'residual') {
      throw new EngineInputError(
        'A column named "residual" clashes with the residual variance; rename it.',
        f.name,
      )
    }
    if (seen.has(f.name)) throw new EngineInputError(`The column "${f.name}" is used twice.`, f.name)
    seen.add(f.name)
  }
}

function checkFactor(f: Factor, nRows: number): void {
  if (f.codes.length !== nRows) {
    throw new EngineInputError(
      `The column "${f.name}" has ${f.codes.length} values but the response has ${nRows}.`,
      f.name,
    )
  }
  const nLabels = f.labels.length
  for (let r = 0; r < nRows; r++) {
    const c = f.codes[r]
    if (c < 0 || c >= nLabels) {
      throw new EngineInputError(`The column "${f.name}" has no valid label in row ${r + 1}.`, f.name)
    }
  }
}

/**
 * Numbers the units of one level by (parent unit, label code). A flat table indexed by
 * parent × nLabels + code keeps the per-row work to one array read; a Map takes over when the
 * table would be large.
 */
function nestLevel(
  name: string,
  codes: Int32Array,
  labels: string[],
  parent: RandomLevel | null,
  inserted: boolean,
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
  return { name, nUnits, unitOfObs, parentOfUnit, unitLabels, inserted }
}

function checkLevelSize(level: RandomLevel, parent: RandomLevel | null, nObs: number): void {
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

function labelsUnderSeveralParents(level: RandomLevel, codes: Int32Array, labels: string[]): string[] {
  if (level.parentOfUnit[0] === -1) return []
  const codeOfUnit = new Int32Array(level.nUnits)
  for (let i = 0; i < codes.length; i++) codeOfUnit[level.unitOfObs[i]] = codes[i]
  const parentsPerCode = new Int32Array(labels.length)
  for (let u = 0; u < level.nUnits; u++) parentsPerCode[codeOfUnit[u]]++
  const repeated: string[] = []
  for (let c = 0; c < labels.length; c++) if (parentsPerCode[c] > 1) repeated.push(labels[c])
  return repeated
}

/** `kept` holds the condition's codes of the kept observations; it is returned as is when already in reference order. */
function codeCondition(condition: Factor, kept: Int32Array, reference: string | undefined): ConditionCoding {
  const { name, labels } = condition
  const refLabel = reference ?? labels[0]
  const refIndex = labels.indexOf(refLabel)
  if (refIndex === -1) {
    throw new EngineInputError(`The reference condition "${reference}" does not occur in "${name}".`, name)
  }
  if (labels.length < 2) {
    throw new EngineInputError(
      `The condition "${name}" has only ${labels.length} label; at least 2 are needed.`,
      name,
    )
  }
  const order = [refIndex, ...labels.map((_, i) => i).filter((i) => i !== refIndex)]
  const newCode = new Int32Array(labels.length)
  order.forEach((old, k) => (newCode[old] = k))
  const codes = refIndex === 0 ? kept : new Int32Array(kept.length)
  const counts = new Int32Array(labels.length)
  for (let i = 0; i < kept.length; i++) {
    const k = newCode[kept[i]]
    if (refIndex !== 0) codes[i] = k
    counts[k]++
  }
  const ordered = order.map((i) => labels[i])
  const empty = ordered.filter((_, k) => counts[k] === 0)
  if (empty.length > 0) {
    throw new EngineInputError(
      `The condition "${name}" has no observations with a response for: ${empty.join(', ')}.`,
      name,
    )
  }
  return { name, labels: ordered, reference: refLabel, codes }
}

function unitsMixConditions(level: RandomLevel, codes: Int32Array): boolean {
  const conditionOfUnit = new Int32Array(level.nUnits).fill(-1)
  for (let i = 0; i < codes.length; i++) {
    const u = level.unitOfObs[i]
    const seen = conditionOfUnit[u]
    if (seen === -1) conditionOfUnit[u] = codes[i]
    else if (seen !== codes[i]) return true
  }
  return false
}
