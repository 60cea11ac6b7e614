import seedrandom from 'seedrandom'
import { quantileSorted } from 'simple-statistics'
import { EngineInputError } from './engine-input-error'
import { normalQuantile } from './normal-quantile'

/** One level of nested units, outermost first (a NestedDesign's random level fits as is). */
export interface BootstrapLevel {
  nUnits: number
  /** For each observation, the index of its unit at this level. */
  unitOfObs: Int32Array
  /** For each unit, the index of its parent unit in the previous (outer) level; -1 at the outermost level. */
  parentOfUnit: Int32Array
}

/** The nested data to resample. A NestedDesign can be passed directly. */
export interface BootstrapInput {
  y: Float64Array
  /** Levels outermost first; the observations sit inside the innermost level's units. */
  randomLevels: BootstrapLevel[]
  /** Condition of each observation, or null for one group. */
  condition: { labels: string[]; codes: Int32Array } | null
}

export interface HierarchicalBootstrapOptions {
  /** Number of bootstrap resamples, default 1000 (at least 100). */
  resamples?: number
  /** Seed of the random stream; the same seed gives the same result. Default 1. */
  seed?: string | number
  /** Level of the percentile intervals, default 0.95. */
  confidence?: number
  /**
   * Condition pairs [a, b] (indices into the condition labels) whose difference mean_a − mean_b
   * is reported. Default: every pair i < j as [j, i], i.e. later minus earlier, so with the
   * reference condition first each condition is compared as "condition − reference".
   */
  pairs?: [number, number][]
  /**
   * Innermost groups of observations with at least this many observations have their resampled
   * sum drawn from its normal approximation (see the doc block); smaller ones are resampled
   * observation by observation. Default 50; Infinity resamples everything exactly.
   */
  exactBelow?: number
  /** Keep the per-resample values (for histograms). Default false. */
  keepDraws?: boolean
}

export interface BootstrapSummary {
  /** The statistic on the original data. */
  observed: number
  /** Mean over the resamples. */
  bootstrapMean: number
  /** Standard deviation over the resamples (the bootstrap standard error). */
  se: number
  /** Percentile interval at the requested confidence. */
  ci: [number, number]
  draws?: Float64Array
}

export interface BootstrapConditionResult extends BootstrapSummary {
  label: string
  code: number
}

export interface BootstrapDifferenceResult extends BootstrapSummary {
  /** The difference is mean(a) − mean(b). */
  a: string
  b: string
  label: string
  /**
   * Two-sided bootstrap p: 2 · min(share of resampled differences ≤ 0, share ≥ 0), at most 1.
   * 0 means "fewer than 1 in `resamples`". A resampling summary, not an exact test.
   */
  pBootstrap: number
}

export interface HierarchicalBootstrapResult {
  resamples: number
  seed: string
  confidence: number
  exactBelow: number
  /** Innermost groups of observations (unit × condition) whose sums were drawn from the normal approximation. */
  approximatedGroups: number
  /** All innermost groups of observations. */
  innermostGroups: number
  conditions: BootstrapConditionResult[]
  differences: BootstrapDifferenceResult[]
}

/**
 * Hierarchical bootstrap (Saravanan, Berman & Sober 2020, Neurons, Behavior, Data analysis, and
 * Theory 3(5)): resample the outermost units with replacement, then inside each drawn unit its
 * child units with replacement, and so on, then the observations inside each drawn innermost
 * unit; compute the mean of the resampled observations per condition and the differences
 * between conditions; repeat. Reports percentile intervals, bootstrap standard errors and a
 * two-sided "bootstrap p" per difference.
 *
 * Each resampling step keeps the design: the children of a unit are resampled within strata of
 * the same condition content (units holding only condition A are replaced by units holding only
 * A; units holding A and B by units holding A and B), and the observations of an innermost unit
 * are resampled within each condition. So every resample has as many units per condition at
 * every level as the data, which matches resampling each condition's units separately when
 * conditions sit in different units, and keeps units paired when they hold several conditions.
 *
 * Speed (approximation): the per-condition mean needs only the sum of the resampled
 * observations. For an innermost group of n observations with mean ȳ and variance
 * s² = Σ(y − ȳ)²/n, the sum of n draws with replacement has mean n·ȳ and variance n·s² exactly;
 * when n ≥ `exactBelow` (default 50) the sum is drawn from Normal(n·ȳ, n·s²) (central limit
 * theorem) instead of drawing n indices. This reproduces the first two moments of each group's
 * contribution exactly and only approximates its shape (skewness falls as 1/√n), which the
 * between-unit resampling then averages further. Set `exactBelow: Infinity` for the exact
 * procedure. The percentile interval uses simple-statistics' quantileSorted.
 *
 * Guard errors: no observations; no level; arrays of the wrong length; unit or condition codes
 * out of range; a unit whose parent disagrees with the level above; a unit without
 * observations; fewer than two outermost units; a non-finite response; fewer than 100
 * resamples; confidence outside (0, 1); an invalid pair.
 *
 * @example
 * hierarchicalBootstrap(design, { resamples: 1000, seed: 'analysis-42' })
 * // → { conditions: [{ label: 'vehicle', observed: 41.2, se: 1.9, ci: [37.6, 45.1], … }, …],
 * //     differences: [{ a: 'compound', b: 'vehicle', observed: 3.1, ci: [-2.0, 8.3], pBootstrap: 0.23, … }] }
 */
export function hierarchicalBootstrap(
  input: BootstrapInput,
  options: HierarchicalBootstrapOptions = {},
): HierarchicalBootstrapResult {
  const resamples = options.resamples ?? 1000
  const confidence = options.confidence ?? 0.95
  const exactBelow = options.exactBelow ?? 50
  const seed = String(options.seed ?? 1)
  if (!Number.isInteger(resamples) || resamples < 100) {
    throw new EngineInputError(
      `hierarchicalBootstrap requires a whole number of at least 100 resamples, got ${resamples}`,
    )
  }
  if (!(confidence > 0 && confidence < 1)) {
    throw new EngineInputError(`hierarchicalBootstrap: confidence must be between 0 and 1, got ${confidence}`)
  }
  if (!(exactBelow >= 1)) {
    throw new EngineInputError(`hierarchicalBootstrap: exactBelow must be at least 1, got ${exactBelow}`)
  }

  const plan = buildPlan(input)
  const nConditions = plan.labels.length
  const pairs = options.pairs ?? defaultPairs(nConditions)
  for (const pair of pairs) {
    if (
      !Array.isArray(pair) ||
      pair.length !== 2 ||
      !pair.every((c) => Number.isInteger(c) && c >= 0 && c < nConditions) ||
      pair[0] === pair[1]
    ) {
      throw new EngineInputError(`hierarchicalBootstrap: invalid condition pair ${JSON.stringify(pair)}`)
    }
  }

  const draws = Array.from({ length: nConditions }, () => new Float64Array(resamples))
  const sums = new Float64Array(nConditions)
  const counts = new Float64Array(nConditions)
  const rng = seedrandom.alea(seed)
  const { strata, pools, y } = plan
  const nLevels = strata.length
  const innermost = nLevels - 1
  const poolSd = new Float64Array(pools.count.length)
  for (let g = 0; g < poolSd.length; g++) poolSd[g] = Math.sqrt(pools.count[g] * pools.variance[g])

  const drawInnermostUnit = (unit: number) => {
    for (let g = pools.unitStart[unit]; g < pools.unitStart[unit + 1]; g++) {
      const n = pools.count[g]
      const c = pools.condition[g]
      counts[c] += n
      if (n >= exactBelow) {
        // Normal deviate by inversion; the guard keeps u strictly inside (0, 1).
        const u = rng() || Number.MIN_VALUE
        sums[c] += n * pools.mean[g] + poolSd[g] * normalQuantile(u)
      } else {
        const start = pools.start[g]
        let s = 0
        for (let j = 0; j < n; j++) s += y[pools.obs[start + Math.floor(rng() * n)]]
        sums[c] += s
      }
    }
  }
  const drawChildren = (level: number, parent: number) => {
    const st = strata[level]
    for (let s = st.parentStart[parent]; s < st.parentStart[parent + 1]; s++) {
      const first = st.stratumStart[s]
      const size = st.stratumStart[s + 1] - first
      for (let j = 0; j < size; j++) {
        const unit = st.members[first + Math.floor(rng() * size)]
        if (level === innermost) drawInnermostUnit(unit)
        else drawChildren(level + 1, unit)
      }
    }
  }

  for (let r = 0; r < resamples; r++) {
    sums.fill(0)
    counts.fill(0)
    drawChildren(0, 0)
    for (let c = 0; c < nConditions; c++) draws[c][r] = sums[c] / counts[c]
  }

  const summarize = (observed: number, values: Float64Array): BootstrapSummary => {
    const sorted = Array.from(values).sort((a, b) => a - b)
    let sum = 0
    for (const v of sorted) sum += v
    const bootstrapMean = sum / sorted.length
    let squares = 0
    for (const v of sorted) squares += (v - bootstrapMean) ** 2
    const tail = (1 - confidence) / 2
    const summary: BootstrapSummary = {
      observed,
      bootstrapMean,
      se: Math.sqrt(squares / (sorted.length - 1)),
      ci: [quantileSorted(sorted, tail), quantileSorted(sorted, 1 - tail)],
    }
    if (options.keepDraws) summary.draws = values
    return summary
  }

  const conditions = plan.labels.map((label, code) => ({
    label,
    code,
    ...summarize(plan.observedMeans[code], draws[code]),
  }))
  const differences = pairs.map(([a, b]) => {
    const values = new Float64Array(resamples)
    let atMostZero = 0
    let atLeastZero = 0
    for (let r = 0; r < resamples; r++) {
      const d = draws[a][r] - draws[b][r]
      values[r] = d
      if (d <= 0) atMostZero++
      if (d >= 0) atLeastZero++
    }
    return {
      a: plan.labels[a],
      b: plan.labels[b],
      label: `${plan.labels[a]} − ${plan.labels[b]}`,
      ...summarize(plan.observedMeans[a] - plan.observedMeans[b], values),
      pBootstrap: Math.min(1, (2 * Math.min(atMostZero, atLeastZero)) / resamples),
    }
  })

  return {
    resamples,
    seed,
    confidence,
    exactBelow,
    approximatedGroups: pools.count.reduce((n, count) => n + (count >= exactBelow ? 1 : 0), 0),
    innermostGroups: pools.count.length,
    conditions,
    differences,
  }
}

function defaultPairs(nConditions: number): [number, number][] {
  const pairs: [number, number][] = []
  for (let i = 0; i < nConditions; i++) for (let j = i + 1; j < nConditions; j++) pairs.push([j, i])
  return pairs
}

/** Children of each parent grouped into strata of equal condition content (CSR layout). */
interface LevelStrata {
  /** Strata of parent p: parentStart[p] … parentStart[p + 1] − 1 (one virtual parent above the outermost level). */
  parentStart: Int32Array
  stratumStart: Int32Array
  members: Int32Array
}

/** Innermost unit × condition groups of observations (CSR layout). */
interface Pools {
  unitStart: Int32Array
  condition: Int32Array
  start: Int32Array
  count: Float64Array
  mean: Float64Array
  variance: Float64Array
  obs: Int32Array
}

interface Plan {
  y: Float64Array
  labels: string[]
  observedMeans: number[]
  strata: LevelStrata[]
  pools: Pools
}

function buildPlan(input: BootstrapInput): Plan {
  if (!input || !(input.y instanceof Float64Array) || input.y.length === 0) {
    throw new EngineInputError('hierarchicalBootstrap requires at least one observation')
  }
  const { y } = input
  const n = y.length
  const levels = input.randomLevels
  if (!Array.isArray(levels) || levels.length === 0) {
    throw new EngineInputError('hierarchicalBootstrap requires at least one level of units')
  }
  for (let i = 0; i < n; i++) {
    if (!Number.isFinite(y[i]))
      throw new EngineInputError(`hierarchicalBootstrap: observation ${i + 1} is not a finite number`)
  }
  checkLevels(levels, n)

  const condition = input.condition
  const labels = condition ? condition.labels : ['all']
  const nConditions = labels.length
  const codes = condition ? condition.codes : new Int32Array(n)
  if (condition) {
    if (!(codes instanceof Int32Array) || codes.length !== n) {
      throw new EngineInputError('hierarchicalBootstrap: the condition needs one code per observation')
    }
    if (nConditions === 0) throw new EngineInputError('hierarchicalBootstrap: the condition has no labels')
  }
  const conditionTotals = new Float64Array(nConditions)
  const conditionCounts = new Float64Array(nConditions)
  for (let i = 0; i < n; i++) {
    const c = codes[i]
    if (c < 0 || c >= nConditions) {
      throw new EngineInputError(
        `hierarchicalBootstrap: condition code ${c} of observation ${i + 1} is out of range`,
      )
    }
    conditionTotals[c] += y[i]
    conditionCounts[c]++
  }
  for (let c = 0; c < nConditions; c++) {
    if (conditionCounts[c] === 0) {
      throw new EngineInputError(`hierarchicalBootstrap: the condition "${labels[c]}" has no observations`)
    }
  }
  const observedMeans = Array.from(conditionTotals, (total, c) => total / conditionCounts[c])

  const inner = levels[levels.length - 1]
  const pools = buildPools(y, inner, codes, nConditions)

  // Condition content of every unit, innermost level first, as an interned key per unit.
  const contentKeys: Int32Array[] = new Array(levels.length)
  const keyIds = new Map<string, number>()
  const keySets: number[][] = []
  const intern = (set: number[]) => {
    const key = set.join(',')
    let id = keyIds.get(key)
    if (id === undefined) {
      id = keySets.length
      keyIds.set(key, id)
      keySets.push(set)
    }
    return id
  }
  const innerKeys = new Int32Array(inner.nUnits)
  for (let u = 0; u < inner.nUnits; u++) {
    const set: number[] = []
    for (let g = pools.unitStart[u]; g < pools.unitStart[u + 1]; g++) set.push(pools.condition[g])
    innerKeys[u] = intern(set)
  }
  contentKeys[levels.length - 1] = innerKeys
  for (let l = levels.length - 2; l >= 0; l--) {
    const child = levels[l + 1]
    const unions: Set<number>[] = Array.from({ length: levels[l].nUnits }, () => new Set<number>())
    const childKeys = contentKeys[l + 1]
    for (let u = 0; u < child.nUnits; u++)
      for (const c of keySets[childKeys[u]]) unions[child.parentOfUnit[u]].add(c)
    contentKeys[l] = Int32Array.from(unions, (set) => intern([...set].sort((a, b) => a - b)))
  }

  const strata = levels.map((level, l) => {
    const parents = l === 0 ? new Int32Array(level.nUnits) : level.parentOfUnit
    const nParents = l === 0 ? 1 : levels[l - 1].nUnits
    return buildStrata(parents, nParents, contentKeys[l], keySets.length)
  })

  return { y, labels, observedMeans, strata, pools }
}

function checkLevels(levels: BootstrapLevel[], n: number): void {
  levels.forEach((level, l) => {
    const where = `level ${l + 1}`
    if (!level || !Number.isInteger(level.nUnits) || level.nUnits < 1) {
      throw new EngineInputError(`hierarchicalBootstrap: ${where} has no units`)
    }
    if (!(level.unitOfObs instanceof Int32Array) || level.unitOfObs.length !== n) {
      throw new EngineInputError(`hierarchicalBootstrap: ${where} needs one unit index per observation`)
    }
    if (!(level.parentOfUnit instanceof Int32Array) || level.parentOfUnit.length !== level.nUnits) {
      throw new EngineInputError(`hierarchicalBootstrap: ${where} needs one parent index per unit`)
    }
    const parentUnits = l === 0 ? 0 : levels[l - 1].nUnits
    for (let u = 0; u < level.nUnits; u++) {
      const p = level.parentOfUnit[u]
      if (l === 0 ? p !== -1 : p < 0 || p >= parentUnits) {
        throw new EngineInputError(
          `hierarchicalBootstrap: unit ${u + 1} of ${where} has an invalid parent index ${p}`,
        )
      }
    }
    const seen = new Uint8Array(level.nUnits)
    const above = l === 0 ? null : levels[l - 1].unitOfObs
    for (let i = 0; i < n; i++) {
      const u = level.unitOfObs[i]
      if (u < 0 || u >= level.nUnits) {
        throw new EngineInputError(
          `hierarchicalBootstrap: observation ${i + 1} has unit index ${u} out of range at ${where}`,
        )
      }
      if (above && level.parentOfUnit[u] !== above[i]) {
        throw new EngineInputError(
          `hierarchicalBootstrap: observation ${i + 1} sits in unit ${u + 1} of ${where}, whose parent is not the observation's unit one level up`,
        )
      }
      seen[u] = 1
    }
    const empty = seen.indexOf(0)
    if (empty >= 0)
      throw new EngineInputError(`hierarchicalBootstrap: unit ${empty + 1} of ${where} has no observations`)
  })
  if (levels[0].nUnits < 2) {
    throw new EngineInputError('hierarchicalBootstrap requires at least two outermost units')
  }
}

function buildPools(y: Float64Array, inner: BootstrapLevel, codes: Int32Array, nConditions: number): Pools {
  const n = y.length
  const nUnits = inner.nUnits
  // Two stable counting sorts: by condition, then by unit → observations ordered by (unit, condition).
  const byCondition = countingSort(codes, nConditions, identityOrder(n))
  const obs = countingSort(inner.unitOfObs, nUnits, byCondition)

  const unitStart = new Int32Array(nUnits + 1)
  const condition: number[] = []
  const start: number[] = []
  for (let i = 0; i < n; i++) {
    const o = obs[i]
    const isNew =
      i === 0 || inner.unitOfObs[obs[i - 1]] !== inner.unitOfObs[o] || codes[obs[i - 1]] !== codes[o]
    if (isNew) {
      condition.push(codes[o])
      start.push(i)
      unitStart[inner.unitOfObs[o] + 1] = condition.length
    }
  }
  // Units are all non-empty (checked), so the running maximum fills the CSR offsets.
  for (let u = 1; u <= nUnits; u++) if (unitStart[u] < unitStart[u - 1]) unitStart[u] = unitStart[u - 1]
  const nPools = condition.length
  start.push(n)
  const count = new Float64Array(nPools)
  const mean = new Float64Array(nPools)
  const variance = new Float64Array(nPools)
  for (let g = 0; g < nPools; g++) {
    let s = 0
    for (let i = start[g]; i < start[g + 1]; i++) s += y[obs[i]]
    const m = s / (start[g + 1] - start[g])
    let ss = 0
    for (let i = start[g]; i < start[g + 1]; i++) ss += (y[obs[i]] - m) ** 2
    count[g] = start[g + 1] - start[g]
    mean[g] = m
    variance[g] = ss / count[g]
  }
  return {
    unitStart,
    condition: Int32Array.from(condition),
    start: Int32Array.from(start),
    count,
    mean,
    variance,
    obs,
  }
}

function buildStrata(
  parentOfUnit: Int32Array,
  nParents: number,
  keys: Int32Array,
  nKeys: number,
): LevelStrata {
  const nUnits = parentOfUnit.length
  // Order units by (parent, content key) with two stable counting sorts.
  const byKey = countingSort(keys, nKeys, identityOrder(nUnits))
  const members = countingSort(parentOfUnit, nParents, byKey)
  const parentStart = new Int32Array(nParents + 1)
  const stratumStart: number[] = []
  for (let i = 0; i < nUnits; i++) {
    const u = members[i]
    const prev = i > 0 ? members[i - 1] : -1
    if (i === 0 || parentOfUnit[prev] !== parentOfUnit[u] || keys[prev] !== keys[u]) {
      stratumStart.push(i)
      parentStart[parentOfUnit[u] + 1] = stratumStart.length
    }
  }
  for (let p = 1; p <= nParents; p++)
    if (parentStart[p] < parentStart[p - 1]) parentStart[p] = parentStart[p - 1]
  stratumStart.push(nUnits)
  return { parentStart, stratumStart: Int32Array.from(stratumStart), members }
}

function identityOrder(n: number): Int32Array {
  const order = new Int32Array(n)
  for (let i = 0; i < n; i++) order[i] = i
  return order
}

/** Stable counting sort of `order` by key[order[i]], keys in [0, nKeys). */
function countingSort(key: Int32Array, nKeys: number, order: Int32Array): Int32Array {
  const offsets = new Int32Array(nKeys + 1)
  for (let i = 0; i < order.length; i++) offsets[key[order[i]] + 1]++
  for (let k = 0; k < nKeys; k++) offsets[k + 1] += offsets[k]
  const sorted = new Int32Array(order.length)
  for (let i = 0; i < order.length; i++) sorted[offsets[key[order[i]]]++] = order[i]
  return sorted
}
