import type { UnitMeansTest } from '../schemas/analysis-result'
import { EngineInputError } from '../stats/engine-input-error'
import { unitMeansTest } from '../stats/unit-means-test'
import type { NestedDesign } from '../stats/types'

export interface UnitMeansComparison {
  test: UnitMeansTest | null
  /** Why there is no test, in plain words (null when there is one or without a condition). */
  problem: string | null
}

/**
 * The "summarise first" comparison at the design's condition level: the plain mean of each unit's
 * observations, then Student's t (2 conditions) or a one-way ANOVA (3+) on those unit means
 * (Lord et al. 2020, J Cell Biol 219:e202001064). For two conditions the difference is oriented
 * as `pair` (a − b) so it reads like the mixed-model contrast.
 *
 * Returns no test, with the reason, when the condition varies inside every innermost unit or
 * when the unit means cannot be tested (e.g. one unit per condition).
 *
 * @example
 * compareUnitMeans(design, { a: 'NW-117', b: 'vehicle' })
 * // → { test: { method: 'student-t', level: 'animal', nUnits: 24, estimate: 5.1, t: 2.4, df: 22, … }, problem: null }
 */
export function compareUnitMeans(
  design: NestedDesign,
  pair: { a: string; b: string } | null,
): UnitMeansComparison {
  const condition = design.condition
  if (!condition) return { test: null, problem: null }
  const level = design.randomLevels.find((l) => l.name === design.conditionLevel)
  if (!level) {
    return {
      test: null,
      problem: `the ${condition.name} varies inside every unit, so no unit carries a single ${condition.name}`,
    }
  }
  const sums = new Float64Array(level.nUnits)
  const counts = new Float64Array(level.nUnits)
  const conditionOfUnit = new Int32Array(level.nUnits)
  for (let i = 0; i < design.nObs; i++) {
    const u = level.unitOfObs[i]
    sums[u] += design.y[i]
    counts[u]++
    conditionOfUnit[u] = condition.codes[i]
  }
  const groups: number[][] = condition.labels.map(() => [])
  for (let u = 0; u < level.nUnits; u++) groups[conditionOfUnit[u]].push(sums[u] / counts[u])

  const k = condition.labels.length
  const order =
    k === 2 && pair
      ? [pair.a, pair.b].map((label) => condition.labels.indexOf(label))
      : condition.labels.map((_, c) => c)
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
        a: condition.labels[order[0]],
        b: condition.labels[order[1]],
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
