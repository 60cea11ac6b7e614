import type { ConditionPlacement, DesignSummary } from '../schemas/datasets'
import {
  buildPaths,
  childrenPerParent,
  conditionDepth,
  reusedLabelCount,
  reusedLabels,
  rowsPerUnit,
  type CodedColumn,
  type PathLevel,
  type Spread,
} from './unit-paths'

export interface DesignInput {
  rowCount: number
  /** Nesting levels, outermost first. */
  levels: readonly CodedColumn[]
  condition: CodedColumn | null
}

export interface DesignFacts extends Omit<DesignSummary, 'missingValues'> {
  /** First row (0-based) without a label at some level, or null. */
  missingLabel: { column: string; rowIndex: number } | null
  /** First row (0-based) without a condition value, or null. */
  missingCondition: { rowIndex: number } | null
}

const fmt = (n: number) => n.toLocaleString('en-US')
const q = (name: string) => `“${name}”`

function spreadWords(spread: Spread): string {
  return spread.min === spread.max ? `${fmt(spread.min)}` : `${fmt(spread.min)} to ${fmt(spread.max)}`
}

/** Sentences on unit counts per level, shared by the suggestion and the tagging summary. */
export function levelSentences(paths: readonly PathLevel[]): string[] {
  const out: string[] = []
  paths.forEach((level, d) => {
    const name = level.column.name
    if (d === 0) out.push(`${q(name)} has ${fmt(level.count)} ${level.count === 1 ? 'unit' : 'units'}.`)
    else {
      const per = childrenPerParent(level, paths[d - 1].count)
      out.push(
        `${q(name)} has ${fmt(level.count)} units, ${per ? spreadWords(per) : '0'} in each ${q(paths[d - 1].column.name)}.`,
      )
    }
    if (d > 0) {
      const reused = reusedLabels(level, 1)
      if (reused.length) {
        out.push(
          `Labels in ${q(name)} repeat under different ${q(paths[d - 1].column.name)} units (for example “${reused[0]}”). ` +
            `Nestwise treats them as different units, keyed by their full path. If they really are the same ${q(name)} units, ` +
            `these columns are crossed, not nested.`,
        )
      }
    }
  })
  const innermost = paths[paths.length - 1]
  if (innermost) {
    const rows = rowsPerUnit(innermost)
    if (rows) out.push(`Each ${q(innermost.column.name)} unit has ${spreadWords(rows)} observations (rows).`)
  }
  return out
}

export function placementOf(
  paths: readonly PathLevel[],
  condition: CodedColumn,
): { depth: number; placement: ConditionPlacement } {
  const depth = conditionDepth(paths, condition)
  if (depth === -1) return { depth, placement: 'within-innermost' }
  return { depth, placement: depth === 0 ? 'between-top' : 'between-units' }
}

/** One plain sentence on where the condition varies and what the independent units are for it. */
export function placementSentence(
  paths: readonly PathLevel[],
  condition: CodedColumn,
  depth: number,
): string {
  const c = q(condition.name)
  if (depth === -1) {
    const inner = q(paths[paths.length - 1].column.name)
    return `${c} changes within every ${inner} unit: each unit is compared with itself, and the comparison rests on the variation between observations inside the units.`
  }
  const level = q(paths[depth].column.name)
  if (depth === 0 && paths.length === 1) {
    // The usual design (animals or cultures assigned to conditions): nothing to warn about.
    return `Each ${level} unit has a single ${c} value: the comparison is between ${level} units, so they are the independent units for it, and the differences between them are what the ${c} effect is tested against. This is the usual design.`
  }
  if (depth === 0) {
    // The outermost level carries the condition while levels sit inside it (each lab ran one arm).
    const inner = q(paths[1].column.name)
    return `Each ${level} unit has a single ${c} value: the comparison is between ${level} units, so they are the independent units for it, not the ${inner} units inside them; ${level} differences and the ${c} effect cannot be separated.`
  }
  const parent = q(paths[depth - 1].column.name)
  const crossedParents = countParentsWithBothArms(paths, depth, condition)
  const within =
    crossedParents === paths[depth - 1].count
      ? `every ${parent} unit`
      : `${fmt(crossedParents)} of ${fmt(paths[depth - 1].count)} ${parent} units`
  return `Each ${level} unit has a single ${c} value, and ${within} holds more than one: the comparison is between ${level} units within ${parent}, so the ${level} units are the independent units for it.`
}

function countParentsWithBothArms(
  paths: readonly PathLevel[],
  depth: number,
  condition: CodedColumn,
): number {
  const level = paths[depth]
  const parentCount = paths[depth - 1].count
  const unitCondition = new Int32Array(level.count).fill(-1)
  for (let r = 0; r < level.ids.length; r++) {
    const id = level.ids[r]
    const c = condition.codes[r]
    if (id >= 0 && c >= 0) unitCondition[id] = c
  }
  const first = new Int32Array(parentCount).fill(-1)
  const mixed = new Uint8Array(parentCount)
  for (let u = 0; u < level.count; u++) {
    const p = level.parent[u]
    const c = unitCondition[u]
    if (c < 0) continue
    if (first[p] === -1) first[p] = c
    else if (first[p] !== c) mixed[p] = 1
  }
  let count = 0
  for (let p = 0; p < parentCount; p++) count += mixed[p]
  return count
}

/**
 * Unit counts per level, where the condition varies, and units per condition value (the "arms"),
 * for a tagged nesting. One pass over the rows per level.
 *
 * @example
 * describeDesign({ rowCount: 4, levels: [animal], condition })
 * // animal: m1 m1 m2 m2, condition: a a b b → conditionPlacement 'between-top', arms a: 1 unit, b: 1 unit
 */
export function describeDesign(input: DesignInput): DesignFacts {
  const { rowCount, levels, condition } = input
  const paths = buildPaths(levels, rowCount)
  let missingLabel: DesignFacts['missingLabel'] = null
  for (const level of paths) {
    // ids are -1 once a label on the path is missing; the first such row at the first level that has one.
    const column = level.column
    for (let r = 0; r < rowCount; r++) {
      if (column.codes[r] < 0) {
        if (!missingLabel || r < missingLabel.rowIndex) missingLabel = { column: column.name, rowIndex: r }
        break
      }
    }
  }
  let missingCondition: DesignFacts['missingCondition'] = null
  let conditionLevel: string | null = null
  let conditionPlacement: ConditionPlacement | null = null
  const arms: DesignSummary['arms'] = []
  const explanation = levelSentences(paths)
  if (condition) {
    for (let r = 0; r < rowCount; r++) {
      if (condition.codes[r] < 0) {
        missingCondition = { rowIndex: r }
        break
      }
    }
    const { depth, placement } = placementOf(paths, condition)
    conditionPlacement = placement
    conditionLevel = depth >= 0 ? paths[depth].column.name : null
    arms.push(...armsOf(paths, condition, depth, rowCount))
    explanation.push(placementSentence(paths, condition, depth))
  }
  return {
    observationCount: rowCount,
    levels: paths.map((level, d) => ({
      column: level.column.name,
      unitCount: level.count,
      perParent: d === 0 ? null : childrenPerParent(level, paths[d - 1].count),
      reusedLabels: d === 0 ? [] : reusedLabels(level),
      reusedLabelCount: d === 0 ? 0 : reusedLabelCount(level),
    })),
    conditionLevel,
    conditionPlacement,
    arms,
    explanation,
    missingLabel,
    missingCondition,
  }
}

function armsOf(
  paths: readonly PathLevel[],
  condition: CodedColumn,
  depth: number,
  rowCount: number,
): DesignSummary['arms'] {
  const labelCount = condition.labels.length
  const observations = new Int32Array(labelCount)
  const units = new Int32Array(labelCount)
  const level = depth >= 0 ? paths[depth] : null
  const counted = level ? new Uint8Array(level.count) : null
  for (let r = 0; r < rowCount; r++) {
    const c = condition.codes[r]
    if (c < 0) continue
    observations[c]++
    if (level) {
      const id = level.ids[r]
      if (id >= 0 && !counted![id]) {
        counted![id] = 1
        units[c]++
      }
    }
  }
  const out: DesignSummary['arms'] = []
  for (let c = 0; c < labelCount; c++) {
    if (observations[c] === 0) continue
    out.push({
      value: condition.labels[c],
      unitCount: level ? units[c] : observations[c],
      observationCount: observations[c],
    })
  }
  return out
}
