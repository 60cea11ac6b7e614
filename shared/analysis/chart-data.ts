import seedrandom from 'seedrandom'
import type {
  ChartData,
  ChartPoints,
  ConditionBars,
  UnitLevelSummary,
  UnitSummary,
} from '../schemas/analyses'
import type { AnalysisResult } from '../schemas/analysis-result'
import type { NestedColumns } from '../stats/types'

/** Points in the scatter at most (every unit cell gets at least one, so many cells can exceed it). */
export const POINT_LIMIT = 5000
/** Seed of the point sample: fixed, so the same data always show the same points. */
export const POINT_SEED = 'nestwise-points'
const PATH_SEPARATOR = ' / '

/**
 * Everything the result page draws, computed once on the server from the rows the engine saw
 * and the engine's result, so the browser never walks a million observations:
 * - per condition, the naive bars (plain mean, SD, SEM and t interval over all observations, from
 *   the result's naive summary) beside the nested bars (the model's estimate, its SE and
 *   Satterthwaite interval, and the SD of the unit means at the condition level);
 * - per given level, every unit (split by condition when it spans several) with n, mean and SD;
 * - a stratified, seeded sample of observations, every unit cell of the point level represented;
 * - variance shares and ICC per level.
 *
 * Rows with a missing response or covariate are skipped, as the engine skips them; units are
 * keyed by their full path, as the engine keys them. With two factors a "condition" is a design
 * cell ("KO:vehicle").
 *
 * Binary and count responses (result.family binomial or poisson): a unit's mean is its
 * proportion of yes (or its rate per observation); with successes out of trials it is its
 * successes over its trials (a ratio of sums, not a mean of row proportions), and each point is
 * its row's successes over trials. The bars are the engine's, already on the response scale.
 */
export function buildChartData(
  columns: NestedColumns,
  result: AnalysisResult,
  options: { pointLimit?: number } = {},
): ChartData {
  const limit = options.pointLimit ?? POINT_LIMIT
  const kept = keptRows(columns)
  const trials = columns.family === 'binomial' ? (columns.trials ?? null) : null
  // Successes out of trials: each row drawn, and summarised, as its proportion.
  const shown = trials ? Float64Array.from(columns.response, (y, i) => y / trials[i]) : columns.response
  const conditionIndex = conditionOfRows(columns, result, kept)

  const unitLevels: UnitLevelSummary[] = []
  const cellsByLevel: CellTable[] = []
  let parentUnit: Int32Array | null = null
  let parentPaths: string[][] = [[]]
  const innermost = columns.levels.length - 1
  for (const [l, factor] of columns.levels.entries()) {
    const units = unitsOfLevel(factor.codes, factor.labels, kept, parentUnit, parentPaths)
    const cells = cellTable(
      units.unitOfRow,
      units.paths,
      conditionIndex,
      result,
      columns.response,
      kept,
      trials,
    )
    cellsByLevel.push(cells)
    const roles: UnitLevelSummary['roles'] = []
    if (factor.name === result.conditionLevel) roles.push('condition-level')
    if (l === innermost) roles.push('innermost')
    if (!roles.length) roles.push('outer')
    unitLevels.push({ level: factor.name, roles, units: cells.units })
    parentUnit = units.unitOfRow
    parentPaths = units.paths
  }

  const pointLevel = result.conditionLevel ?? columns.levels[innermost].name
  const pointLevelIndex = columns.levels.findIndex((f) => f.name === pointLevel)
  const points = samplePoints(cellsByLevel[pointLevelIndex], shown, kept, pointLevel, limit)

  const conditionLevelIndex =
    result.conditionLevel === null ? -1 : columns.levels.findIndex((f) => f.name === result.conditionLevel)
  const conditions: ConditionBars[] = result.groups.map((g, c) => {
    const naiveSd = g.naive.se * Math.sqrt(g.nObs)
    const unitMeans =
      conditionLevelIndex === -1
        ? null
        : unitLevels[conditionLevelIndex].units
            .filter((u) => u.condition === conditionLabel(result, c))
            .map((u) => u.mean)
    return {
      condition: g.condition,
      nObs: g.nObs,
      naive: {
        estimate: g.mean,
        se: g.naive.se,
        df: g.naive.df,
        ci: [g.naive.ciLow, g.naive.ciHigh],
        sd: naiveSd,
      },
      nested: {
        estimate: g.clustered.estimate,
        se: g.clustered.se,
        df: g.clustered.df,
        ci: [g.clustered.ciLow, g.clustered.ciHigh],
        sd: unitMeans && unitMeans.length >= 2 ? sampleSd(unitMeans) : null,
        nUnits: unitMeans ? unitMeans.length : null,
      },
    }
  })

  return {
    ...(result.family && result.family !== 'gaussian' ? { family: result.family } : {}),
    response: result.response,
    condition: result.condition,
    conditionLevel: result.conditionLevel,
    conditions,
    unitLevels,
    points,
    variance: { components: result.varianceComponents, icc: result.icc },
  }
}

function conditionLabel(result: AnalysisResult, c: number): string | null {
  return result.condition === null ? null : result.groups[c].condition
}

/** Rows the engine keeps: a response (and its trials) and every covariate present. */
function keptRows(columns: NestedColumns): Int32Array {
  const covariates = (columns.covariates ?? []).map((c) => c.values)
  if (columns.family === 'binomial' && columns.trials) covariates.push(columns.trials)
  const present = (i: number) =>
    !Number.isNaN(columns.response[i]) && covariates.every((v) => !Number.isNaN(v[i]))
  const kept: number[] = []
  for (let i = 0; i < columns.response.length; i++) if (present(i)) kept.push(i)
  return Int32Array.from(kept)
}

/**
 * For each kept row, the index of its design cell in the result's group order (0 without a
 * condition): its label of each factor, joined by ":" for two factors.
 */
function conditionOfRows(columns: NestedColumns, result: AnalysisResult, kept: Int32Array): Int32Array {
  const out = new Int32Array(kept.length)
  const factors = columns.factors ?? []
  if (factors.length === 0) return out
  const order = new Map(result.groups.map((g, i) => [g.condition, i]))
  const lookup = new Map<string, number>()
  for (let k = 0; k < kept.length; k++) {
    const row = kept[k]
    const key = factors.map((f) => f.codes[row]).join(',')
    let c = lookup.get(key)
    if (c === undefined) {
      const label = factors.map((f) => f.labels[f.codes[row]]).join(':')
      c = order.get(label)
      if (c === undefined) throw new Error(`condition label "${label}" is not in the result`)
      lookup.set(key, c)
    }
    out[k] = c
  }
  return out
}

/** Units of one level keyed by (parent unit, label): unit index per kept row and each unit's path. */
function unitsOfLevel(
  codes: Int32Array,
  labels: string[],
  kept: Int32Array,
  parentUnit: Int32Array | null,
  parentPaths: string[][],
) {
  const index = new Map<number, number>()
  const paths: string[][] = []
  const unitOfRow = new Int32Array(kept.length)
  const width = labels.length
  // Rows of one unit usually come together: compare with the previous row before the Map lookup.
  let lastKey = -1
  let lastUnit = -1
  for (let k = 0; k < kept.length; k++) {
    const parent = parentUnit ? parentUnit[k] : 0
    const code = codes[kept[k]]
    const key = parent * width + code
    if (key === lastKey) {
      unitOfRow[k] = lastUnit
      continue
    }
    let unit = index.get(key)
    if (unit === undefined) {
      unit = paths.length
      index.set(key, unit)
      paths.push([...parentPaths[parent], labels[code]])
    }
    unitOfRow[k] = unit
    lastKey = key
    lastUnit = unit
  }
  return { unitOfRow, paths }
}

interface CellTable {
  /** Cell (unit × condition) of each kept row, numbered in display order. */
  cellOfRow: Int32Array
  /** Observations per cell. */
  count: Int32Array
  units: UnitSummary[]
}

const collator = new Intl.Collator('en', { numeric: true })

/**
 * Welford accumulation per unit × condition cell; cells listed by condition, then by path. With
 * trials, a cell's mean is its successes over its trials and it has no SD.
 */
function cellTable(
  unitOfRow: Int32Array,
  paths: string[][],
  conditionOfRow: Int32Array,
  result: AnalysisResult,
  response: Float64Array,
  kept: Int32Array,
  trials: Float64Array | null = null,
): CellTable {
  const nConditions = result.groups.length
  const cellOfRow = new Int32Array(kept.length)
  const slot = new Map<number, number>()
  const cellUnit: number[] = []
  const cellCondition: number[] = []
  let lastKey = -1
  let lastCell = -1
  for (let k = 0; k < kept.length; k++) {
    const key = unitOfRow[k] * nConditions + conditionOfRow[k]
    if (key === lastKey) {
      cellOfRow[k] = lastCell
      continue
    }
    let cell = slot.get(key)
    if (cell === undefined) {
      cell = cellUnit.length
      slot.set(key, cell)
      cellUnit.push(unitOfRow[k])
      cellCondition.push(conditionOfRow[k])
    }
    cellOfRow[k] = cell
    lastKey = key
    lastCell = cell
  }
  const nCells = cellUnit.length
  const n = new Int32Array(nCells)
  const mean = new Float64Array(nCells)
  const m2 = new Float64Array(nCells)
  const trialSum = trials ? new Float64Array(nCells) : null
  for (let k = 0; k < kept.length; k++) {
    const c = cellOfRow[k]
    const y = response[kept[k]]
    const count = ++n[c]
    if (trialSum) {
      mean[c] += y
      trialSum[c] += trials![kept[k]]
      continue
    }
    const delta = y - mean[c]
    mean[c] += delta / count
    m2[c] += delta * (y - mean[c])
  }
  if (trialSum) for (let c = 0; c < nCells; c++) mean[c] /= trialSum[c]

  const labels = cellUnit.map((u) => paths[u].join(PATH_SEPARATOR))
  const order = Array.from({ length: nCells }, (_, i) => i).sort(
    (a, b) => cellCondition[a] - cellCondition[b] || collator.compare(labels[a], labels[b]),
  )
  const rank = new Int32Array(nCells)
  order.forEach((cell, position) => (rank[cell] = position))
  for (let k = 0; k < kept.length; k++) cellOfRow[k] = rank[cellOfRow[k]]
  return {
    cellOfRow,
    count: Int32Array.from(order, (cell) => n[cell]),
    units: order.map((cell) => ({
      path: paths[cellUnit[cell]],
      label: labels[cell],
      condition: conditionLabel(result, cellCondition[cell]),
      n: n[cell],
      mean: mean[cell],
      sd: !trialSum && n[cell] >= 2 ? Math.sqrt(m2[cell] / (n[cell] - 1)) : null,
      ...(trialSum ? { trials: trialSum[cell] } : {}),
    })),
  }
}

/**
 * Stratified sample: each cell gets max(1, its proportional share of `limit`) points (largest
 * remainders first, never more than it has), drawn without replacement by a seeded partial
 * Fisher–Yates shuffle, then listed in cell order and row order. All points when N ≤ limit.
 */
function samplePoints(
  cells: CellTable,
  response: Float64Array,
  kept: Int32Array,
  level: string,
  limit: number,
): ChartPoints {
  const total = kept.length
  const nCells = cells.count.length
  const quota = allocate(cells.count, total, limit)
  const start = new Int32Array(nCells + 1)
  for (let c = 0; c < nCells; c++) start[c + 1] = start[c] + cells.count[c]
  const members = new Int32Array(total)
  const fill = start.slice(0, nCells)
  for (let k = 0; k < total; k++) members[fill[cells.cellOfRow[k]]++] = k
  const random = seedrandom(POINT_SEED)
  const y: number[] = []
  const cell: number[] = []
  for (let c = 0; c < nCells; c++) {
    const from = start[c]
    const size = start[c + 1] - from
    const take = quota[c]
    if (take < size) {
      for (let j = 0; j < take; j++) {
        const pick = from + j + Math.floor(random() * (size - j))
        const swap = members[from + j]
        members[from + j] = members[pick]
        members[pick] = swap
      }
    }
    const chosen = Array.from(members.subarray(from, from + take)).sort((a, b) => a - b)
    for (const k of chosen) {
      y.push(response[kept[k]])
      cell.push(c)
    }
  }
  return { level, limit, nTotal: total, nShown: y.length, seed: POINT_SEED, y, cell }
}

function allocate(count: Int32Array, total: number, limit: number): Int32Array {
  const quota = new Int32Array(count.length)
  if (total <= limit) return quota.map((_, c) => count[c])
  const remainders: { c: number; r: number }[] = []
  let used = 0
  for (let c = 0; c < count.length; c++) {
    const exact = (count[c] * limit) / total
    quota[c] = Math.min(count[c], Math.max(1, Math.floor(exact)))
    used += quota[c]
    remainders.push({ c, r: exact - Math.floor(exact) })
  }
  remainders.sort((a, b) => b.r - a.r || a.c - b.c)
  for (const { c } of remainders) {
    if (used >= limit) break
    if (quota[c] < count[c]) {
      quota[c]++
      used++
    }
  }
  return quota
}

function sampleSd(values: number[]): number {
  const mean = values.reduce((s, v) => s + v, 0) / values.length
  const ss = values.reduce((s, v) => s + (v - mean) ** 2, 0)
  return Math.sqrt(ss / (values.length - 1))
}
