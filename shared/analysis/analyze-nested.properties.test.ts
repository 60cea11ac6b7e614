/**
 * Invariances of the whole analysis (sources: common practice, no source): the order of the rows,
 * the names of the units and a shift of the response's origin must not change what it says,
 * except that a shift moves the means by the same amount.
 */
import seedrandom from 'seedrandom'
import { describe, expect, it } from 'vitest'
import type { AnalysisResult } from '../schemas/analysis-result'
import { analyzeNested } from './analyze-nested'
import type { Factor, NestedColumns } from '../stats/types'

interface Scenario {
  name: string
  seed: string
  conditions: string[]
  /** 'animal': each animal one condition; 'within': every animal's cells split over the conditions. */
  conditionAt: 'animal' | 'within'
}

/** Invented, seeded, unbalanced: 6 labs × 3–6 mice × 2–9 neurons, mouse labels repeat across labs. */
function simulate(s: Scenario): NestedColumns {
  const rng = seedrandom(s.seed)
  const normal = () => Math.sqrt(-2 * Math.log(1 - rng())) * Math.cos(2 * Math.PI * rng())
  const lab: number[] = []
  const animal: number[] = []
  const condition: number[] = []
  const y: number[] = []
  for (let l = 0; l < 6; l++) {
    const labShift = 2 * normal()
    const mice = 3 + Math.floor(rng() * 4)
    for (let a = 0; a < mice; a++) {
      const mouseShift = 1.5 * normal()
      const cells = 2 + Math.floor(rng() * 8)
      for (let c = 0; c < cells; c++) {
        const k = s.conditionAt === 'animal' ? (a + l) % s.conditions.length : c % s.conditions.length
        lab.push(l)
        animal.push(a)
        condition.push(k)
        y.push(50 + 3 * k + labShift + mouseShift + 4 * normal())
      }
    }
  }
  const factor = (name: string, codes: number[], labels: string[]): Factor => ({
    name,
    codes: Int32Array.from(codes),
    labels,
  })
  return {
    responseName: 'neurite_length_um',
    response: Float64Array.from(y),
    levels: [
      factor('lab', lab, ['L1', 'L2', 'L3', 'L4', 'L5', 'L6']),
      factor('animal', animal, ['m1', 'm2', 'm3', 'm4', 'm5', 'm6']),
    ],
    factors: [factor('treatment', condition, s.conditions)],
  }
}

function permuteRows(columns: NestedColumns, seed: string): NestedColumns {
  const rng = seedrandom(seed)
  const n = columns.response.length
  const order = Array.from({ length: n }, (_, i) => i)
  for (let i = n - 1; i > 0; i--) {
    const j = Math.floor(rng() * (i + 1))
    ;[order[i], order[j]] = [order[j], order[i]]
  }
  const take = (f: Factor): Factor => ({ ...f, codes: Int32Array.from(order, (i) => f.codes[i]) })
  return {
    ...columns,
    response: Float64Array.from(order, (i) => columns.response[i]),
    levels: columns.levels.map(take),
    factors: (columns.factors ?? []).map(take),
  }
}

/** New names for every lab and mouse, listed in a different order (so the codes change too). */
function relabelUnits(columns: NestedColumns): NestedColumns {
  const rename = (f: Factor, prefix: string): Factor => {
    const k = f.labels.length
    // Code c becomes code k − 1 − c, whose label is a new name derived from the old one.
    const labels = Array.from({ length: k }, (_, c) => `${prefix}-${f.labels[k - 1 - c]}-renamed`)
    return { ...f, labels, codes: Int32Array.from(f.codes, (c) => k - 1 - c) }
  }
  return { ...columns, levels: [rename(columns.levels[0], 'site'), rename(columns.levels[1], 'mouse')] }
}

function shift(columns: NestedColumns, by: number): NestedColumns {
  return { ...columns, response: Float64Array.from(columns.response, (v) => v + by) }
}

/** Fields that name units; they differ after relabelling by construction. */
const NAMING_FIELDS = new Set(['implicitNesting', 'warnings'])
/** Fields that move with the response's origin. */
const LOCATION_FIELDS =
  /^groups\.\d+\.(mean|naive\.ci(Low|High)|clustered\.(estimate|ci(Low|High)))$|^comparisons\.bootstrap\.groups\.\d+\.(estimate|ciLow|ciHigh)$|^comparisons\.mixedModel\.coefficients\.0\.estimate$/
/** The intercept's test (mean = 0) is about location itself. */
const INTERCEPT_TEST = ['comparisons.mixedModel.coefficients.0.t', 'comparisons.mixedModel.coefficients.0.p']

/** Walks both results; numbers must agree within a relative tolerance, `offset(path)` is added to the expected value. */
function expectSameResult(
  actual: unknown,
  expected: unknown,
  options: { tolerance: number; skip?: Set<string>; offset?: (path: string) => number },
  path = '',
): void {
  if (options.skip?.has(path)) return
  if (typeof expected === 'number') {
    const target = expected + (options.offset?.(path) ?? 0)
    expect(typeof actual, path).toBe('number')
    const scale = Math.max(1, Math.abs(target))
    expect(Math.abs((actual as number) - target), `${path}: ${actual} vs ${target}`).toBeLessThanOrEqual(
      options.tolerance * scale,
    )
    return
  }
  if (expected === null || typeof expected !== 'object') {
    expect(actual, path).toEqual(expected)
    return
  }
  expect(actual !== null && typeof actual === 'object', path).toBe(true)
  const keys = Object.keys(expected as object)
  expect(Object.keys(actual as object).sort(), path).toEqual([...keys].sort())
  for (const key of keys) {
    const child = path ? `${path}.${key}` : key
    expectSameResult(
      (actual as Record<string, unknown>)[key],
      (expected as Record<string, unknown>)[key],
      options,
      child,
    )
  }
}

const scenarios: Scenario[] = [
  {
    name: 'two conditions between mice',
    seed: 'prop-a',
    conditions: ['vehicle', 'NW-117'],
    conditionAt: 'animal',
  },
  {
    name: 'three conditions between mice',
    seed: 'prop-b',
    conditions: ['0 µM', '1 µM', '10 µM'],
    conditionAt: 'animal',
  },
  {
    name: 'two conditions within mice',
    seed: 'prop-c',
    conditions: ['vehicle', 'NW-117'],
    conditionAt: 'within',
  },
]

describe.each(scenarios)('analyzeNested invariances: $name', (scenario) => {
  const columns = simulate(scenario)
  const reference = scenario.conditions[0]
  const base: AnalysisResult = analyzeNested(columns, { reference: { treatment: reference } })

  it('is a non-trivial fit (guards the checks below against comparing empty results)', () => {
    expect(base.nObs).toBeGreaterThan(100)
    expect(base.varianceComponents.length).toBeGreaterThanOrEqual(3)
    expect(base.comparisons.mixedModel!.contrasts.length).toBeGreaterThan(0)
  })

  it('does not depend on the order of the rows', () => {
    const shuffled = analyzeNested(permuteRows(columns, 'shuffle-1'), { reference: { treatment: reference } })
    expectSameResult(shuffled, base, { tolerance: 1e-7 })
  })

  it('does not depend on the names of the units', () => {
    const renamed = analyzeNested(relabelUnits(columns), { reference: { treatment: reference } })
    expectSameResult(renamed, base, { tolerance: 1e-7, skip: NAMING_FIELDS })
    expect(renamed.warnings.map((w) => w.code)).toEqual(base.warnings.map((w) => w.code))
  })

  it('moves only the means when a constant is added to the response', () => {
    const by = 1000
    const shifted = analyzeNested(shift(columns, by), { reference: { treatment: reference } })
    expectSameResult(shifted, base, {
      // The REML optimum is found on data of a different magnitude; agreement to 1e-6 is ample.
      tolerance: 1e-6,
      skip: new Set(['remlCriterion', ...INTERCEPT_TEST]),
      offset: (path) => (LOCATION_FIELDS.test(path) ? by : 0),
    })
    expect(shifted.remlCriterion).toBeCloseTo(base.remlCriterion!, 4)
    // The comparison is not vacuous: without the offset the shifted means are caught.
    expect(() =>
      expectSameResult(shifted, base, {
        tolerance: 1e-6,
        skip: new Set(['remlCriterion', ...INTERCEPT_TEST]),
      }),
    ).toThrow(/groups\.0\.mean/)
  })

  it('moves the bootstrap means by the constant and keeps its differences', () => {
    const settings = { resamples: 200, seed: 'prop' }
    const plain = analyzeNested(columns, { reference: { treatment: reference }, bootstrap: settings })
      .comparisons.bootstrap!
    const moved = analyzeNested(shift(columns, 1000), {
      reference: { treatment: reference },
      bootstrap: settings,
    }).comparisons.bootstrap!
    expectSameResult(moved, plain, {
      tolerance: 1e-8,
      offset: (path) => (/^groups\.\d+\.(estimate|ciLow|ciHigh)$/.test(path) ? 1000 : 0),
    })
  })
})
