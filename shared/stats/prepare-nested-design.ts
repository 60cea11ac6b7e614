import { carrierLevel, checkNotALevel, codeFactor, designCells } from './design/code-factors'
import { fixedLayout } from './design/fixed-layout'
import { checkLevelSize, labelsUnderSeveralParents, nestLevel } from './design/nest-level'
import { maximalRandomTerms } from './design/random-terms'
import { EngineInputError } from './engine-input-error'
import type {
  CovariateColumn,
  Factor,
  NestedColumns,
  NestedDesign,
  NumericColumn,
  RandomLevel,
} from './types'

export interface PrepareNestedDesignOptions {
  /** Reference label per factor name; a factor left out uses its first label. */
  reference?: Record<string, string>
  /**
   * Allow innermost units of one observation each (binary and count models: an observation-level
   * random intercept is identified there and models overdispersion; in the normal model it would
   * be the residual itself).
   */
  observationLevelUnits?: boolean
}

/** At most two condition factors (A * B). */
const MAX_FACTORS = 2

/**
 * Turns raw columns into the maximal nested design the mixed model fits: drops rows whose
 * response or a covariate is missing, keys every unit by its full path (animal "3" of lab A is
 * not animal "3" of lab B), codes each condition factor against its reference, forms the design
 * cells (A × B), and lists the random intercepts: every given level, plus `<level>:<factor>`
 * for every level within whose units a factor (or the two factors' combination) varies (see
 * maximalRandomTerms). Units of each level are numbered by (parent unit, label order), so the
 * numbering does not depend on row order and the children of a unit are contiguous.
 *
 * Reference level: `opts.reference[factor]`, else the factor's first label (a table reader
 * lists labels in order of first appearance).
 *
 * Source: the model of Pinheiro & Bates (2000), Mixed-Effects Models in S and S-PLUS, ch. 2
 * (nested grouping factors keyed by their path, as `lab/animal` in nlme/lme4); Barr, Levy,
 * Scheepers & Tily (2013), J Mem Lang 68:255 (level × condition terms, "keep it maximal").
 *
 * Guard errors (EngineInputError): no level; columns of unequal length; an infinite value; a
 * code outside its label list; fewer than 2 observations; fewer than 2 outermost units; a level
 * with no more units than its parent, or one observation per unit; more than two factors; a
 * factor with fewer than 2 labels, a label without observations, an unknown reference; two
 * factors that are confounded or not fully crossed; a factor that relabels a level's units; a
 * covariate that does not vary; duplicate column names.
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
  const factors = columns.factors ?? []
  const covariates = columns.covariates ?? []
  const nRows = response.length
  if (levels.length === 0) throw new EngineInputError('At least one nesting level (e.g. animal) is needed.')
  if (factors.length > MAX_FACTORS) {
    throw new EngineInputError(`At most ${MAX_FACTORS} condition columns can be compared at once.`)
  }
  checkNames(columns.responseName, [...levels, ...factors], covariates)
  for (const f of [...levels, ...factors]) checkFactor(f, nRows)
  for (const c of covariates) checkLength(c.name, c.values.length, nRows)

  const keepRow = new Uint8Array(nRows)
  let nObs = 0
  for (let r = 0; r < nRows; r++) {
    if (!isPresent(response[r], columns.responseName, r)) continue
    if (!covariates.every((c) => isPresent(c.values[r], c.name, r))) continue
    keepRow[r] = 1
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
    for (let r = 0, i = 0; r < nRows; r++) if (keepRow[r]) rowOfObs[i++] = r
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
    const level = nestLevel(factor.name, codes, factor.labels, parent)
    checkLevelSize(level, parent, opts.observationLevelUnits ? Infinity : nObs)
    const repeated = labelsUnderSeveralParents(level, codes, factor.labels)
    if (repeated.length > 0) implicitNesting.push({ level: factor.name, labels: repeated })
    randomLevels.push(level)
    parent = level
  }

  const coded = factors.map((f) =>
    codeFactor(
      f,
      keep(f.codes, (n) => new Int32Array(n)),
      opts.reference?.[f.name],
    ),
  )
  for (const name of Object.keys(opts.reference ?? {})) {
    if (!factors.some((f) => f.name === name)) {
      throw new EngineInputError(
        `A reference level is given for "${name}", which is not a condition column.`,
        name,
      )
    }
  }
  for (const f of coded) {
    f.carrier = carrierLevel(randomLevels, f.codes)
    checkNotALevel(f, randomLevels)
  }
  const cells = designCells(coded, nObs)
  const covariateColumns = covariates.map((c) =>
    describeCovariate(
      c.name,
      keep(c.values, (n) => new Float64Array(n)),
      randomLevels,
    ),
  )
  const { terms, skipped } = maximalRandomTerms(randomLevels, coded, cells, nObs)

  return {
    responseName: columns.responseName,
    nObs,
    y,
    randomLevels,
    factors: coded,
    cells,
    covariates: covariateColumns,
    terms,
    skippedTerms: skipped,
    fixed: fixedLayout(coded, covariateColumns, cells),
    cellLevel: coded.length > 0 ? carrierLevel(randomLevels, cells.codes) : -1,
    implicitNesting,
    nDropped,
    rowOfObs,
  }
}

function isPresent(v: number, name: string, row: number): boolean {
  if (v !== v) return false // NaN: missing
  if (v === Infinity || v === -Infinity) {
    throw new EngineInputError(`The column "${name}" is infinite in row ${row + 1}.`, name)
  }
  return true
}

function checkNames(response: string, factors: Factor[], covariates: NumericColumn[]): void {
  const seen = new Set<string>([response])
  for (const name of [...factors.map((f) => f.name), ...covariates.map((c) => c.name)]) {
    if (name === 'residual') {
      throw new EngineInputError(
        'A column named "residual" clashes with the residual variance; rename it.',
        name,
      )
    }
    if (seen.has(name)) throw new EngineInputError(`The column "${name}" is used twice.`, name)
    seen.add(name)
  }
}

function checkLength(name: string, length: number, nRows: number): void {
  if (length !== nRows) {
    throw new EngineInputError(
      `The column "${name}" has ${length} values but the response has ${nRows}.`,
      name,
    )
  }
}

function checkFactor(f: Factor, nRows: number): void {
  checkLength(f.name, f.codes.length, nRows)
  const nLabels = f.labels.length
  for (let r = 0; r < nRows; r++) {
    const c = f.codes[r]
    if (c < 0 || c >= nLabels) {
      throw new EngineInputError(`The column "${f.name}" has no valid label in row ${r + 1}.`, f.name)
    }
  }
}

function describeCovariate(name: string, values: Float64Array, levels: RandomLevel[]): CovariateColumn {
  const n = values.length
  let mean = 0
  for (let i = 0; i < n; i++) mean += values[i]
  mean /= n
  let squares = 0
  for (let i = 0; i < n; i++) squares += (values[i] - mean) ** 2
  const sd = Math.sqrt(squares / (n - 1))
  if (!(sd > 1e-12 * Math.max(1, Math.abs(mean)))) {
    throw new EngineInputError(
      `The covariate "${name}" has the same value in every row, so it cannot adjust anything.`,
      name,
    )
  }
  const constantWithin = levels.findIndex((level) => constantInUnits(level, values))
  return { name, values, mean, sd, constantWithin }
}

function constantInUnits(level: RandomLevel, values: Float64Array): boolean {
  const first = new Float64Array(level.nUnits).fill(NaN)
  for (let i = 0; i < values.length; i++) {
    const u = level.unitOfObs[i]
    const seen = first[u]
    if (seen !== seen) first[u] = values[i]
    else if (seen !== values[i]) return false
  }
  return true
}
