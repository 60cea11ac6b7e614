import { EngineInputError } from '../engine-input-error'
import type { DesignCells, Factor, FactorCoding, RandomLevel } from '../types'

/**
 * Codes one condition factor against its reference: labels reordered reference first, codes of
 * the kept observations remapped (returned as is when already in reference order). `carrier` is
 * left at -1 for the caller to fill.
 */
export function codeFactor(factor: Factor, kept: Int32Array, reference: string | undefined): FactorCoding {
  const { name, labels } = factor
  const refLabel = reference ?? labels[0]
  const refIndex = labels.indexOf(refLabel)
  if (refIndex === -1) {
    throw new EngineInputError(`The reference level "${reference}" does not occur in "${name}".`, name)
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
  return { name, labels: ordered, reference: refLabel, codes, carrier: -1 }
}

/** True when some unit of the level holds more than one label of the codes. */
export function unitsMix(level: RandomLevel, codes: Int32Array): boolean {
  const seen = new Int32Array(level.nUnits).fill(-1)
  for (let i = 0; i < codes.length; i++) {
    const u = level.unitOfObs[i]
    if (seen[u] === -1) seen[u] = codes[i]
    else if (seen[u] !== codes[i]) return true
  }
  return false
}

/** Index of the outermost level whose units each hold one label of the codes; -1 when none does. */
export function carrierLevel(levels: RandomLevel[], codes: Int32Array): number {
  for (let l = 0; l < levels.length; l++) if (!unitsMix(levels[l], codes)) return l
  return -1
}

/**
 * The design cells of zero, one or two coded factors. Two factors must be crossed: every
 * combination observed, and neither a relabelling of the other.
 */
export function designCells(factors: FactorCoding[], nObs: number): DesignCells {
  if (factors.length === 0) {
    return { labels: ['all'], levelsOf: [[]], codes: new Int32Array(nObs), counts: [nObs] }
  }
  if (factors.length === 1) {
    const [f] = factors
    const counts = new Array<number>(f.labels.length).fill(0)
    for (let i = 0; i < nObs; i++) counts[f.codes[i]]++
    return { labels: [...f.labels], levelsOf: f.labels.map((_, k) => [k]), codes: f.codes, counts }
  }
  const [a, b] = factors
  const kB = b.labels.length
  const nCells = a.labels.length * kB
  const codes = new Int32Array(nObs)
  const counts = new Array<number>(nCells).fill(0)
  for (let i = 0; i < nObs; i++) {
    const c = a.codes[i] * kB + b.codes[i]
    codes[i] = c
    counts[c]++
  }
  const present = counts.filter((n) => n > 0).length
  if (present === a.labels.length && present === kB) {
    throw new EngineInputError(
      `"${b.name}" is fully confounded with "${a.name}": each label of one always goes with the same label of the other, so their effects cannot be told apart. Use one of them.`,
      b.name,
    )
  }
  const missing = counts.findIndex((n) => n === 0)
  if (missing !== -1) {
    const la = a.labels[Math.floor(missing / kB)]
    const lb = b.labels[missing % kB]
    throw new EngineInputError(
      `No observation has ${a.name} = "${la}" together with ${b.name} = "${lb}". The ${a.name} × ${b.name} model needs every combination.`,
      b.name,
    )
  }
  const levelsOf = Array.from({ length: nCells }, (_, c) => [Math.floor(c / kB), c % kB])
  return { labels: levelsOf.map(([i, j]) => `${a.labels[i]}:${b.labels[j]}`), levelsOf, codes, counts }
}

/**
 * Refuses a factor whose labels are just another name for the units of its carrying level (each
 * unit its own label): its effect and that level's variance would be one and the same.
 */
export function checkNotALevel(factor: FactorCoding, levels: RandomLevel[]): void {
  if (factor.carrier < 0) return
  const level = levels[factor.carrier]
  if (level.nUnits === factor.labels.length) {
    throw new EngineInputError(
      `"${factor.name}" groups the rows exactly as "${level.name}" does (each ${level.name} has a ${factor.name} of its own), so the ${factor.name} effect cannot be told apart from ${level.name}-to-${level.name} differences.`,
      factor.name,
    )
  }
}
