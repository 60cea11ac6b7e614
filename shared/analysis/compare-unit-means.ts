import type { UnitMeansTest } from '../schemas/analysis-result'
import { EngineInputError } from '../stats/engine-input-error'
import { leastSquaresTermTests } from '../stats/least-squares-term-tests'
import { invertSpd } from '../stats/reml/small-cholesky'
import { typeThreeHypotheses } from '../stats/type-three-hypotheses'
import type { NestedDesign } from '../stats/types'
import { unitMeansTest } from '../stats/unit-means-test'

export interface UnitMeansComparison {
  test: UnitMeansTest | null
  /** Why there is no test, in plain words (null when there is one or without a condition). */
  problem: string | null
}

/**
 * The "summarise first" comparison at the outermost level whose units each hold a single design
 * cell: the plain mean of each unit's observations (its proportion or rate for a binary or count
 * response; Σ successes / Σ trials when the rows hold successes out of trials), then Student's t (two conditions), a one-way
 * ANOVA (three or more) or, for two factors, a two-way ANOVA with the model's type III
 * hypotheses on those unit means (Lord et al. 2020, J Cell Biol 219:e202001064; Searle 1971,
 * Linear Models, §3.6). Covariates are not part of this check. For two conditions the
 * difference is oriented as `pair` (a − b) so it reads like the mixed-model contrast.
 *
 * Returns no test, with the reason, when no level's units hold a single cell or when the unit
 * means cannot be tested (e.g. one unit per cell).
 *
 * @example
 * compareUnitMeans(design, { a: 'NW-117', b: 'vehicle' })
 * // → { test: { method: 'student-t', level: 'animal', nUnits: 24, estimate: 5.1, t: 2.4, df: 22, … }, problem: null }
 */
export function compareUnitMeans(
  design: NestedDesign,
  pair: { a: string; b: string } | null,
  trials: Float64Array | null = null,
): UnitMeansComparison {
  if (design.factors.length === 0) return { test: null, problem: null }
  const what = design.factors.length === 2 ? 'combination of conditions' : design.factors[0].name
  if (design.cellLevel < 0) {
    return {
      test: null,
      problem: `the ${what} varies inside every unit, so no unit carries a single ${what}`,
    }
  }
  const level = design.randomLevels[design.cellLevel]
  const sums = new Float64Array(level.nUnits)
  const counts = new Float64Array(level.nUnits)
  const cellOfUnit = new Int32Array(level.nUnits)
  for (let i = 0; i < design.nObs; i++) {
    const u = level.unitOfObs[i]
    sums[u] += design.y[i]
    counts[u] += trials ? trials[i] : 1
    cellOfUnit[u] = design.cells.codes[i]
  }
  const unitMeans = Array.from(sums, (s, u) => s / counts[u])
  if (design.factors.length === 2) return twoWay(design, level.name, unitMeans, cellOfUnit)

  const labels = design.cells.labels
  const groups: number[][] = labels.map(() => [])
  unitMeans.forEach((m, u) => groups[cellOfUnit[u]].push(m))
  const order =
    labels.length === 2 && pair ? [pair.a, pair.b].map((l) => labels.indexOf(l)) : labels.map((_, c) => c)
  let result
  try {
    result = unitMeansTest(order.map((c) => groups[c]))
  } catch (error) {
    if (error instanceof EngineInputError)
      return { test: null, problem: error.message.replace(/^unitMeansTest:?\s*/, '') }
    throw error
  }
  const base = { level: level.name, nUnits: level.nUnits, p: result.p }
  if (result.method === 'student-t') {
    return {
      test: {
        method: 'student-t',
        ...base,
        a: labels[order[0]],
        b: labels[order[1]],
        estimate: result.diff!,
        se: result.se!,
        t: result.t!,
        df: result.df!,
      },
      problem: null,
    }
  }
  return {
    test: { method: 'one-way-anova', ...base, f: result.f, df1: result.df1, df2: result.df2 },
    problem: null,
  }
}

/** Least squares of the unit means on the A * B cell rows, type III F per term. */
function twoWay(
  design: NestedDesign,
  levelName: string,
  unitMeans: number[],
  cellOfUnit: Int32Array,
): UnitMeansComparison {
  const { fixed } = design
  const keep = fixed.columns.map((_, j) => j).filter((j) => !fixed.covariateColumns.includes(j))
  const p = fixed.columns.length
  const rowOf = (c: number) => keep.map((j) => fixed.cellRows[c * p + j])
  const q = keep.length
  const dfResidual = unitMeans.length - q
  if (dfResidual < 1) {
    return {
      test: null,
      problem: `each combination of conditions has a single ${levelName}, so there is no ${levelName}-to-${levelName} spread to test against`,
    }
  }
  const xtx = Array.from({ length: q }, () => new Array<number>(q).fill(0))
  const xty = new Array<number>(q).fill(0)
  unitMeans.forEach((m, u) => {
    const x = rowOf(cellOfUnit[u])
    for (let a = 0; a < q; a++) {
      xty[a] += x[a] * m
      for (let b = 0; b < q; b++) xtx[a][b] += x[a] * x[b]
    }
  })
  const xtxInverse = invertSpd(xtx)
  const beta = xtxInverse.map((row) => row.reduce((s, v, k) => s + v * xty[k], 0))
  let rss = 0
  unitMeans.forEach((m, u) => {
    const x = rowOf(cellOfUnit[u])
    rss += (m - x.reduce((s, v, k) => s + v * beta[k], 0)) ** 2
  })
  const hypotheses = typeThreeHypotheses(
    fixed,
    design.factors.map((f) => f.labels.length),
  )
    .filter((h) => !fixed.covariateColumns.some((col) => fixed.columns[col].term === h.term))
    .map((h) => ({ term: h.term, rows: h.rows.map((row) => keep.map((j) => row[j])) }))
  const terms = leastSquaresTermTests({ beta, xtxInverse, rss, dfResidual }, hypotheses)
  if (terms.length === 0)
    return { test: null, problem: `the ${levelName} means do not vary within any combination of conditions` }
  return {
    test: { method: 'two-way-anova', level: levelName, nUnits: unitMeans.length, terms },
    problem: null,
  }
}
