import type { ColumnType, NestingSuggestion } from '../schemas/datasets'
import { levelSentences, placementOf, placementSentence } from './describe-design'
import { areYesNoLabels } from '../analysis/binary-response'
import {
  childrenPerParent,
  countPaths,
  extendPaths,
  reusedLabelCount,
  reusedLabels,
  type CodedColumn,
  type PathLevel,
} from './unit-paths'

export interface SuggestionColumn {
  name: string
  type: ColumnType
  distinctCount: number
  missingCount: number
  /** Per-row codes; null when the column has too many distinct values to be a grouping. */
  coded: CodedColumn | null
}

const CONDITION_WORDS = new Set([
  'treatment',
  'treatments',
  'treat',
  'condition',
  'conditions',
  'cond',
  'group',
  'groups',
  'genotype',
  'dose',
  'doses',
  'drug',
  'compound',
  'arm',
  'stimulus',
  'stim',
  'intervention',
  'therapy',
  'exposure',
])
const CONDITION_VALUES = new Set([
  'vehicle',
  'veh',
  'control',
  'ctrl',
  'placebo',
  'sham',
  'dmso',
  'saline',
  'untreated',
  'treated',
  'wt',
  'wildtype',
  'wild-type',
  'ko',
  'knockout',
  'mock',
])
/**
 * Usual outer-to-inner order of unit words in lab data (common practice, no source). Used only when
 * the data cannot tell which of two columns is outer (labels reused, so they look crossed).
 */
const UNIT_RANK: Record<string, number> = {
  consortium: 0,
  lab: 0,
  labs: 0,
  site: 0,
  centre: 0,
  center: 0,
  experiment: 1,
  day: 1,
  date: 1,
  batch: 1,
  session: 1,
  week: 1,
  cage: 2,
  litter: 2,
  animal: 3,
  mouse: 3,
  mice: 3,
  rat: 3,
  subject: 3,
  patient: 3,
  donor: 3,
  participant: 3,
  fish: 3,
  embryo: 3,
  culture: 4,
  prep: 4,
  preparation: 4,
  slice: 4,
  section: 4,
  organoid: 4,
  explant: 4,
  replicate: 4,
  plate: 5,
  slide: 5,
  coverslip: 5,
  dish: 5,
  chamber: 5,
  well: 6,
  field: 6,
  image: 6,
  fov: 6,
  tile: 6,
}
const UNIT_WORDS = new Set([...Object.keys(UNIT_RANK), 'id'])

function unitRank(name: string): number | null {
  for (const word of nameWords(name)) if (word in UNIT_RANK) return UNIT_RANK[word]
  return null
}
/** Integer columns named like this number objects; they are never suggested as a response. */
const ID_WORDS = new Set([
  'id',
  'index',
  'idx',
  'cell',
  'neuron',
  'nucleus',
  'roi',
  'object',
  'track',
  'no',
  'nr',
  'number',
])
const MAX_CONDITION_VALUES = 12
/** A grouping column changes value rarely from one row to the next (exports list a unit's rows together). */
const MAX_RUN_SHARE = 0.2
const MAX_MISSING_SHARE = 0.01
const MAX_LEVELS = 6

const q = (name: string) => `“${name}”`

export function nameWords(name: string): string[] {
  return name
    .replace(/([a-z])([A-Z])/g, '$1 $2')
    .toLowerCase()
    .split(/[^a-z]+/)
    .filter(Boolean)
}

/** How many runs of equal values the column has in file order. */
function runCount(column: CodedColumn, rowCount: number): number {
  let runs = rowCount > 0 ? 1 : 0
  const codes = column.codes
  for (let r = 1; r < rowCount; r++) if (codes[r] !== codes[r - 1]) runs++
  return runs
}

/** True when most rows hold the previous row's number plus one (1, 2, 3 … as object numbers do). */
function countsUpByOne(column: CodedColumn, rowCount: number): boolean {
  const values = column.labels.map(Number)
  let steps = 0
  for (let r = 1; r < rowCount; r++) {
    const a = column.codes[r - 1]
    const b = column.codes[r]
    if (a >= 0 && b >= 0 && values[b] === values[a] + 1) steps++
  }
  return rowCount > 1 && steps >= 0.8 * (rowCount - 1)
}

function isGroupingCandidate(column: SuggestionColumn, rowCount: number): boolean {
  const coded = column.coded
  if (!coded || column.distinctCount < 2 || column.distinctCount > rowCount / 2) return false
  if (column.missingCount > MAX_MISSING_SHARE * rowCount) return false
  if (column.type === 'text') return true
  if (column.type !== 'integer') return false
  // Integers may be unit numbers (animal 3) or counts (12 branches): names and row order tell them apart.
  if (nameWords(column.name).some((w) => UNIT_WORDS.has(w))) return true
  return runCount(coded, rowCount) <= MAX_RUN_SHARE * rowCount
}

function conditionScore(column: SuggestionColumn): number {
  if (!column.coded || column.distinctCount < 2 || column.distinctCount > MAX_CONDITION_VALUES) return 0
  let score = 0
  if (nameWords(column.name).some((w) => CONDITION_WORDS.has(w))) score += 2
  if (column.coded.labels.some((label) => CONDITION_VALUES.has(label.trim().toLowerCase()))) score += 1
  return score
}

interface Trial {
  column: SuggestionColumn
  /** Units the column would split the current parent into. */
  count: number
}

/**
 * The fewest-paths candidate is the outer one whenever one column is constant within the other's
 * units. When neither is (labels reused, so the columns look crossed), prefer the usual order of
 * unit words, then the column whose value changes less often in file order.
 */
function resolveCrossed(
  bestLevel: PathLevel,
  best: Trial,
  trials: readonly Trial[],
  rowCount: number,
): Trial {
  const contenders = trials.filter((t) => {
    if (t === best) return false
    // Units of both columns together: more than either alone means neither is constant within the other.
    const joint = countPaths(bestLevel, t.column.coded!, rowCount)
    return joint > best.count && joint > t.count
  })
  if (!contenders.length) return best
  const key = (t: Trial) => ({
    rank: unitRank(t.column.name),
    runs: runCount(t.column.coded!, rowCount),
    count: t.count,
  })
  return [best, ...contenders].sort((a, b) => {
    const ka = key(a)
    const kb = key(b)
    if (ka.rank !== null && kb.rank !== null && ka.rank !== kb.rank) return ka.rank - kb.rank
    return ka.runs - kb.runs || ka.count - kb.count
  })[0]
}

/**
 * When no numeric column can be the response, the one text column with exactly two values besides
 * the condition, not named like a unit, is the response (nothing else could be), unless it is an
 * alias or an outer level; as the innermost suggested level it only split each unit by its two
 * values. Two such columns, or none: null, and the person picks.
 */
function yesNoResponse(
  columns: readonly SuggestionColumn[],
  paths: readonly PathLevel[],
  used: ReadonlySet<string>,
  condition: string | null,
): SuggestionColumn | null {
  const found = columns.filter(
    (c) =>
      c.type === 'text' &&
      c.distinctCount === 2 &&
      c.coded !== null &&
      areYesNoLabels(c.coded.labels) &&
      c.name !== condition &&
      !nameWords(c.name).some((w) => UNIT_WORDS.has(w)),
  )
  if (found.length !== 1) return null
  const innermost = paths[paths.length - 1]?.column.name
  return !used.has(found[0].name) || found[0].name === innermost ? found[0] : null
}

/**
 * Proposes the nesting of a table from its columns: which columns group the rows into units,
 * in which order (outer units have fewer paths), which column is the condition, and which
 * numeric columns can be responses. Pure and deterministic; the explanation is in plain words.
 *
 * Heuristics (common practice in per-cell exports, no source): a grouping column is text, or an
 * integer named like a unit or changing value rarely between consecutive rows; it has few missing
 * labels; a condition has 2–12 values and a name or values that say so (treatment, vehicle, WT).
 * Levels are added greedily, fewest distinct paths first; a column that does not split the units
 * further is an alias; one that splits them into nearly single rows numbers the observations.
 *
 * @example
 * suggestNesting(1000, [lab, animal, treatment, length])
 * // → { levels: [lab, animal], conditionColumn: 'treatment', conditionPlacement: 'between-units', responseColumns: ['length'], … }
 */
export function suggestNesting(rowCount: number, columns: readonly SuggestionColumn[]): NestingSuggestion {
  const candidates = columns.filter((c) => isGroupingCandidate(c, rowCount))
  const conditionPick = columns
    .map((c) => ({ column: c, score: conditionScore(c) }))
    .filter((c) => c.score > 0)
    .sort((a, b) => b.score - a.score || a.column.distinctCount - b.column.distinctCount)[0]?.column
  const condition = conditionPick?.coded ?? null

  const paths: PathLevel[] = []
  const aliases: NestingSuggestion['aliases'] = []
  let observationIds: string[] = []
  let remaining = candidates.filter((c) => c !== conditionPick)
  while (remaining.length && paths.length < MAX_LEVELS) {
    const parent = paths[paths.length - 1] ?? null
    const parentCount = parent ? parent.count : 1
    const trials: Trial[] = remaining.map((c) => ({
      column: c,
      count: countPaths(parent, c.coded!, rowCount),
    }))
    const next: typeof remaining = []
    let best: Trial | null = null
    for (const trial of trials) {
      if (trial.count <= parentCount && parent) {
        aliases.push({ column: trial.column.name, sameAs: parent.column.name })
      } else if (trial.count > rowCount / 2) {
        observationIds.push(trial.column.name)
      } else {
        next.push(trial.column)
        if (!best || trial.count < best.count) best = trial
      }
    }
    if (!best) break
    const bestLevel = extendPaths(parent, best.column.coded!, rowCount)
    const chosenTrial = resolveCrossed(
      bestLevel,
      best,
      trials.filter((t) => next.includes(t.column)),
      rowCount,
    )
    paths.push(chosenTrial === best ? bestLevel : extendPaths(parent, chosenTrial.column.coded!, rowCount))
    const chosen = chosenTrial.column
    remaining = next.filter((c) => c !== chosen)
  }
  observationIds = observationIds.filter((name) => !paths.some((p) => p.column.name === name))
  // Integer columns that count up row by row number the observations (cell 1, 2, 3 … in each animal).
  // Checked on the values in file order only: building a unit per row would cost a million-entry map.
  for (const column of columns) {
    if (column.type !== 'integer' || candidates.includes(column) || observationIds.includes(column.name))
      continue
    const namedLikeId = nameWords(column.name).some((w) => ID_WORDS.has(w))
    if (namedLikeId || (column.coded && countsUpByOne(column.coded, rowCount)))
      observationIds.push(column.name)
  }

  const used = new Set([
    ...paths.map((p) => p.column.name),
    ...aliases.map((a) => a.column),
    ...observationIds,
  ])
  if (conditionPick) used.add(conditionPick.name)
  const responseColumns = columns
    .filter(
      (c) =>
        !used.has(c.name) && (c.type === 'numeric' || c.type === 'integer') && c.missingCount < rowCount / 2,
    )
    .filter((c) => !candidates.includes(c))
    .map((c) => c.name)
  const yesNo = responseColumns.length
    ? null
    : yesNoResponse(columns, paths, used, conditionPick?.name ?? null)
  if (yesNo) {
    responseColumns.push(yesNo.name)
    if (paths[paths.length - 1]?.column.name === yesNo.name) paths.pop()
  }

  const explanation: string[] = []
  let conditionLevel: string | null = null
  let conditionPlacement: NestingSuggestion['conditionPlacement'] = null
  if (paths.length) {
    explanation.push(`Suggested nesting, outermost first: ${paths.map((p) => q(p.column.name)).join(' › ')}.`)
    explanation.push(...levelSentences(paths))
  } else {
    explanation.push(
      'No column groups the rows into units. Pick the columns that identify your independent units (for example animal or culture) yourself.',
    )
  }
  for (const alias of aliases)
    explanation.push(
      `${q(alias.column)} adds nothing beyond ${q(alias.sameAs)} (one value per unit), so it is not a separate level.`,
    )
  for (const name of observationIds)
    explanation.push(
      `${q(name)} is different for almost every row, so it numbers the observations rather than grouping them.`,
    )
  if (conditionPick && condition) {
    const values = condition.labels
      .slice(0, MAX_CONDITION_VALUES)
      .map((l) => `“${l}”`)
      .join(', ')
    explanation.push(`${q(conditionPick.name)} looks like the condition to compare (${values}).`)
    if (paths.length) {
      const { depth, placement } = placementOf(paths, condition)
      conditionPlacement = placement
      conditionLevel = depth >= 0 ? paths[depth].column.name : null
      explanation.push(placementSentence(paths, condition, depth))
    }
  } else {
    explanation.push(
      'No column looks like a condition (treatment, genotype, dose). Pick one if you compare conditions.',
    )
  }
  if (yesNo)
    explanation.push(
      `No numeric column can be the response; ${q(yesNo.name)} holds two values (${yesNo.coded!.labels.map(q).join(', ')}), so it is suggested as the response, analysed as yes/no.`,
    )
  else if (responseColumns.length)
    explanation.push(`Numeric columns that can be the response: ${responseColumns.map(q).join(', ')}.`)

  return {
    levels: paths.map((level, d) => ({
      column: level.column.name,
      unitCount: level.count,
      perParent: d === 0 ? null : childrenPerParent(level, paths[d - 1].count),
      reusedLabels: d === 0 ? [] : reusedLabels(level),
      reusedLabelCount: d === 0 ? 0 : reusedLabelCount(level),
    })),
    conditionColumn: conditionPick?.name ?? null,
    conditionLevel,
    conditionPlacement,
    responseColumns,
    aliases,
    explanation,
    observationCount: rowCount,
  }
}
