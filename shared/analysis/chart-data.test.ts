import { sampleStandardDeviation } from 'simple-statistics'
import { describe, expect, it } from 'vitest'
import { ChartData, ConditionBars } from '../schemas/analyses'
import { analyzeNested } from './analyze-nested'
import type { NestedColumns } from '../stats/types'
import { buildChartData } from './chart-data'
import { inventedNeuronRows, inventedNeuronTable } from './fixtures/invented-glmm-tables'
import { nestedColumnsFromTable } from '../stats/fixtures/nested-columns-from-table'

/** Invented: mice nested in labs (labels reused across labs), treatment per mouse, a few neurons each. */
function table(rows: [lab: string, mouse: string, treatment: string, y: number][]): NestedColumns {
  const factor = (name: string, values: string[]) => {
    const labels = [...new Set(values)]
    return { name, labels, codes: Int32Array.from(values, (v) => labels.indexOf(v)) }
  }
  return {
    responseName: 'neurite_um',
    response: Float64Array.from(rows.map((r) => r[3])),
    levels: [
      factor(
        'lab',
        rows.map((r) => r[0]),
      ),
      factor(
        'mouse',
        rows.map((r) => r[1]),
      ),
    ],
    factors: [
      factor(
        'treatment',
        rows.map((r) => r[2]),
      ),
    ],
  }
}

const ROWS: [string, string, string, number][] = [
  ['North', 'm1', 'vehicle', 10],
  ['North', 'm1', 'vehicle', 12],
  ['North', 'm1', 'vehicle', 14],
  ['North', 'm2', 'NW-117', 20],
  ['North', 'm2', 'NW-117', 22],
  ['North', 'm3', 'vehicle', 11],
  ['North', 'm3', 'vehicle', NaN],
  ['North', 'm3', 'vehicle', 13],
  ['South', 'm1', 'NW-117', 18],
  ['South', 'm1', 'NW-117', 19],
  ['South', 'm1', 'NW-117', 23],
  ['South', 'm2', 'vehicle', 9],
  ['South', 'm2', 'vehicle', 15],
  ['South', 'm3', 'NW-117', 21],
  ['South', 'm3', 'NW-117', 25],
  ['South', 'm3', 'NW-117', 17],
]

describe('buildChartData', () => {
  const columns = table(ROWS)
  const result = analyzeNested(columns, { reference: { treatment: 'vehicle' } })
  const chart = buildChartData(columns, result)

  it('matches its schema', () => {
    expect(() => ChartData.parse(chart)).not.toThrow()
  })

  it('keys mice by their lab, splits nothing else, and skips the missing response (arithmetic by hand)', () => {
    const mice = chart.unitLevels[1]
    expect(mice.level).toBe('mouse')
    expect(mice.roles).toEqual(['condition-level', 'innermost'])
    // Reference first, then by path in natural order.
    expect(mice.units.map((u) => `${u.condition}:${u.label}`)).toEqual([
      'vehicle:North / m1',
      'vehicle:North / m3',
      'vehicle:South / m2',
      'NW-117:North / m2',
      'NW-117:South / m1',
      'NW-117:South / m3',
    ])
    const northM3 = mice.units[1]
    expect(northM3).toMatchObject({ path: ['North', 'm3'], n: 2, mean: 12 })
    expect(northM3.sd).toBeCloseTo(Math.SQRT2, 12) // values 11, 13: SD √2
    const southM1 = mice.units[4]
    expect(southM1).toMatchObject({ n: 3, mean: 20 })
    expect(southM1.sd).toBeCloseTo(Math.sqrt(7), 12) // 18, 19, 23: deviations −2, −1, 3 → 14/2
  })

  it('lists each lab once per condition it holds', () => {
    const labs = chart.unitLevels[0]
    expect(labs.roles).toEqual(['outer'])
    expect(labs.units.map((u) => [u.label, u.condition, u.n])).toEqual([
      ['North', 'vehicle', 5],
      ['South', 'vehicle', 2],
      ['North', 'NW-117', 2],
      ['South', 'NW-117', 6],
    ])
  })

  it('gives naive bars from all observations and nested bars from the model and the unit means', () => {
    const vehicle = chart.conditions[0]
    const values = ROWS.filter((r) => r[2] === 'vehicle' && !Number.isNaN(r[3])).map((r) => r[3])
    expect(vehicle.condition).toBe('vehicle')
    expect(vehicle.nObs).toBe(values.length)
    // Plain SD and SEM of the observations (common practice; simple-statistics as the independent sum).
    expect(vehicle.naive.sd).toBeCloseTo(sampleStandardDeviation(values), 10)
    expect(vehicle.naive.se).toBeCloseTo(sampleStandardDeviation(values) / Math.sqrt(values.length), 10)
    expect(vehicle.naive.df).toBe(values.length - 1)
    const group = result.groups[0]
    expect(vehicle.nested).toMatchObject({
      estimate: group.clustered.estimate,
      se: group.clustered.se,
      df: group.clustered.df,
      nUnits: 3,
    })
    expect(vehicle.nested.ci).toEqual([group.clustered.ciLow, group.clustered.ciHigh])
    // SD of the vehicle mice's means 12, 12, 12 = 0 (by hand).
    expect(vehicle.nested.sd).toBeCloseTo(0, 12)
    // NW-117 mice: 21, 20, 21 → SD √(1/3) (by hand).
    expect(chart.conditions[1].nested.sd).toBeCloseTo(Math.sqrt(1 / 3), 12)
  })

  it('shows every observation when there are few, each with its mouse', () => {
    expect(chart.points).toMatchObject({ level: 'mouse', nTotal: 15, nShown: 15 })
    const mice = chart.unitLevels[1].units
    chart.points.y.forEach((y, i) => {
      const mouse = mice[chart.points.cell[i]]
      const own = ROWS.filter((r) => `${r[0]} / ${r[1]}` === mouse.label).map((r) => r[3])
      expect(own).toContain(y)
    })
  })

  it('copies the variance shares and ICC of the result', () => {
    expect(chart.variance.components).toEqual(result.varianceComponents)
    expect(chart.variance.icc).toEqual(result.icc)
  })
})

describe('buildChartData point sample', () => {
  // 40 mice of 20–400 neurons: far more observations than the limit (invented, seeded by index).
  const rows: [string, string, string, number][] = []
  for (let m = 0; m < 40; m++) {
    const size = 20 + ((m * 97) % 381)
    for (let c = 0; c < size; c++)
      rows.push(['Only', `m${m}`, m % 2 ? 'NW-117' : 'vehicle', 100 + m + ((c * 31) % 17)])
  }
  const columns = table(rows)
  columns.levels = [columns.levels[1]]
  const result = analyzeNested(columns)
  const limit = 500

  it('stays near the limit, keeps every mouse, and roughly follows the mice sizes', () => {
    const chart = buildChartData(columns, result, { pointLimit: limit })
    const points = chart.points
    expect(points.nTotal).toBe(rows.length)
    expect(points.nShown).toBeLessThanOrEqual(limit + 40)
    expect(points.nShown).toBeGreaterThanOrEqual(limit - 1)
    const perCell = new Map<number, number>()
    for (const c of points.cell) perCell.set(c, (perCell.get(c) ?? 0) + 1)
    expect(perCell.size).toBe(40)
    const mice = chart.unitLevels[0].units
    for (const [cell, shown] of perCell) {
      const share = mice[cell].n / rows.length
      expect(Math.abs(shown - share * limit)).toBeLessThanOrEqual(1.5)
    }
  })

  it('is the same sample every time', () => {
    const a = buildChartData(columns, result, { pointLimit: limit }).points
    const b = buildChartData(columns, result, { pointLimit: limit }).points
    expect(b).toEqual(a)
  })

  it('draws only values that belong to the point’s mouse', () => {
    const chart = buildChartData(columns, result, { pointLimit: limit })
    const mice = chart.unitLevels[0].units
    chart.points.y.forEach((y, i) => {
      const label = mice[chart.points.cell[i]].path[0]
      const m = Number(label.slice(1))
      expect(y - 100 - m).toBeGreaterThanOrEqual(0)
      expect(y - 100 - m).toBeLessThan(17)
    })
  })
})

describe('buildChartData with the condition inside mice', () => {
  // Invented within-mouse design: two coverslips per mouse, one per treatment.
  const rows: [string, string, string, number][] = []
  for (let m = 1; m <= 4; m++)
    for (const t of ['vehicle', 'NW-117'])
      for (let c = 0; c < 3; c++) rows.push(['Only', `m${m}`, t, m * 2 + (t === 'NW-117' ? 5 : 0) + c])
  const columns = table(rows)
  columns.levels = [columns.levels[1]]
  const result = analyzeNested(columns, { reference: { treatment: 'vehicle' } })
  const chart = buildChartData(columns, result)

  it('has no condition level, colours points by mouse, and lists each mouse once per condition', () => {
    expect(chart.conditionLevel).toBeNull()
    expect(chart.points.level).toBe('mouse')
    const mice = chart.unitLevels[0]
    expect(mice.roles).toEqual(['innermost'])
    expect(mice.units).toHaveLength(8)
    expect(mice.units[0]).toMatchObject({ label: 'm1', condition: 'vehicle', n: 3, mean: 3 }) // 2, 3, 4
    expect(mice.units[4]).toMatchObject({ label: 'm1', condition: 'NW-117', n: 3, mean: 8 }) // 7, 8, 9
    expect(chart.conditions[0].nested.sd).toBeNull()
    expect(chart.conditions[0].nested.nUnits).toBeNull()
  })
})

describe('buildChartData without a condition', () => {
  it('has one group "all" and units without a condition', () => {
    const columns = table(ROWS)
    columns.factors = []
    const result = analyzeNested(columns)
    const chart = buildChartData(columns, result)
    expect(chart.conditions.map((c) => c.condition)).toEqual(['all'])
    expect(chart.unitLevels[1].units.every((u) => u.condition === null)).toBe(true)
    expect(chart.unitLevels[1].units).toHaveLength(6)
  })
})

describe('stored charts of engine 0.1', () => {
  it('read their bars in the one interval shape', () => {
    // A condition's bars as engine 0.1 stored them (invented numbers).
    const stored = {
      condition: 'vehicle',
      nObs: 6,
      naive: { mean: 10, sd: 2, sem: 0.8, ci95: [8, 12], df: 5 },
      nested: { mean: 10.5, sem: 1.5, ci95: [5, 16], df: 2, sd: 1.4, nUnits: 2 },
    }
    expect(ConditionBars.parse(stored)).toEqual({
      condition: 'vehicle',
      nObs: 6,
      naive: { estimate: 10, se: 0.8, df: 5, ci: [8, 12], sd: 2 },
      nested: { estimate: 10.5, se: 1.5, df: 2, ci: [5, 16], sd: 1.4, nUnits: 2 },
    })
  })
})

describe('buildChartData for binary and count responses', () => {
  // Invented neurons in mice in three labs (see fixtures/invented-glmm-tables.ts).
  const rows = inventedNeuronRows()
  const perNeuron = {
    ...nestedColumnsFromTable(inventedNeuronTable(rows), 'marker01', ['lab', 'mouse'], 'treatment'),
    family: 'binomial' as const,
  }
  const perNeuronChart = buildChartData(
    perNeuron,
    analyzeNested(perNeuron, { reference: { treatment: 'vehicle' } }),
  )

  it('says the family and draws each unit as its proportion of yes', () => {
    expect(perNeuronChart.family).toBe('binomial')
    expect(() => ChartData.parse(perNeuronChart)).not.toThrow()
    const mice = perNeuronChart.unitLevels.find((l) => l.level === 'mouse')!.units
    const first = rows.filter((r) => `${r.lab} / ${r.mouse}` === mice[0].label)
    // Counted by hand from the invented rows: positive neurons over neurons of that mouse.
    expect(mice[0].mean).toBeCloseTo(first.filter((r) => r.marker === 'positive').length / first.length, 12)
    expect(mice[0].trials).toBeUndefined()
  })

  it('gives the same unit proportions from successes out of trials, each point a proportion', () => {
    const mice = new Map<string, { lab: string; mouse: string; treatment: string; yes: number; n: number }>()
    for (const r of rows) {
      const m = mice.get(`${r.lab}/${r.mouse}`) ?? { ...r, yes: 0, n: 0 }
      m.yes += r.marker === 'positive' ? 1 : 0
      m.n += 1
      mice.set(`${r.lab}/${r.mouse}`, m)
    }
    // Two rows per mouse (the neurons split in halves), so a unit sums its rows' trials.
    const halves = [...mice.values()].flatMap((m) => {
      const firstYes = Math.floor(m.yes / 2)
      const firstN = Math.max(firstYes, Math.floor(m.n / 2))
      return [
        { ...m, yes: firstYes, n: firstN },
        { ...m, yes: m.yes - firstYes, n: m.n - firstN },
      ]
    })
    const table = {
      lab: halves.map((m) => m.lab),
      mouse: halves.map((m) => m.mouse),
      treatment: halves.map((m) => m.treatment),
      yes: halves.map((m) => m.yes),
    }
    const aggregated = {
      ...nestedColumnsFromTable(table, 'yes', ['lab', 'mouse'], 'treatment'),
      family: 'binomial' as const,
      trials: Float64Array.from(halves.map((m) => m.n)),
      trialsName: 'n',
    }
    const chart = buildChartData(
      aggregated,
      analyzeNested(aggregated, { reference: { treatment: 'vehicle' } }),
    )
    const byLabel = (c: ChartData) =>
      new Map(c.unitLevels.find((l) => l.level === 'mouse')!.units.map((u) => [u.label, u.mean]))
    const expected = byLabel(perNeuronChart)
    for (const [label, mean] of byLabel(chart)) expect(mean).toBeCloseTo(expected.get(label)!, 12)
    const unit = chart.unitLevels.find((l) => l.level === 'mouse')!.units[0]
    expect(unit).toMatchObject({ n: 2, sd: null })
    expect(unit.trials).toBe(mice.get(unit.label.replace(' / ', '/'))!.n)
    expect(chart.points.y.every((y) => y >= 0 && y <= 1)).toBe(true)
  })

  it('leaves the family out for a normal response, as before', () => {
    const chart = buildChartData(table(ROWS), analyzeNested(table(ROWS)))
    expect('family' in chart).toBe(false)
  })
})
