import { describe, expect, it } from 'vitest'
import type { ChartData } from '../../../shared/schemas/analyses'
import { mainChartOption, placeUnits, SERIES_NAMES, SLOT, type ChartColors } from './main-chart-option'
import { unitStyle, UNIT_HUES } from './unit-style'

const colors: ChartColors = {
  text: '#000',
  muted: '#777',
  grid: '#ccc',
  naive: '#555',
  nested: '#1d5e66',
  background: '#fff',
}

// Invented chart data: two units per condition, three observations each.
const unit = (label: string, condition: string, mean: number) => ({
  path: [label],
  label,
  condition,
  n: 3,
  mean,
  sd: 1,
})
const chart: ChartData = {
  response: 'length',
  condition: 'treatment',
  conditionLevel: 'mouse',
  conditions: [
    {
      condition: 'vehicle',
      nObs: 6,
      naive: { estimate: 10, se: 0.8, df: 5, ci: [8, 12], sd: 2 },
      nested: { estimate: 10, se: 1.5, df: 2, ci: [5, 15], sd: 1.4, nUnits: 2 },
    },
    {
      condition: 'drug',
      nObs: 6,
      naive: { estimate: 14, se: 0.8, df: 5, ci: [12, 16], sd: 2 },
      nested: { estimate: 14, se: 1.5, df: 2, ci: [9, 19], sd: null, nUnits: 2 },
    },
  ],
  unitLevels: [
    {
      level: 'mouse',
      roles: ['condition-level', 'innermost'],
      units: [
        unit('m1', 'vehicle', 9),
        unit('m2', 'vehicle', 11),
        unit('m3', 'drug', 13),
        unit('m4', 'drug', 15),
      ],
    },
  ],
  points: {
    level: 'mouse',
    limit: 5000,
    nTotal: 12,
    nShown: 12,
    seed: 's',
    y: [8, 9, 10, 10, 11, 12, 12, 13, 14, 14, 15, 16],
    cell: [0, 0, 0, 1, 1, 1, 2, 2, 2, 3, 3, 3],
  },
  variance: { components: [], icc: [] },
}

type Series = { name: string; type: string; data: unknown[] }

describe('main chart option', () => {
  it('places each unit inside its own condition’s slot', () => {
    const placed = placeUnits(chart)
    for (const p of placed) {
      const slot = p.unit.condition === 'vehicle' ? 0 : 1
      expect(p.x).toBeGreaterThanOrEqual(slot + SLOT.unitsFrom)
      expect(p.x).toBeLessThanOrEqual(slot + SLOT.unitsTo)
    }
  })

  it('draws every sampled point, every unit mean, and naive beside nested bars', () => {
    const series = mainChartOption(chart, 'sem', colors).series as Series[]
    const points = series.filter((s) => s.name === SERIES_NAMES.observations)
    expect(points.reduce((n, s) => n + s.data.length, 0)).toBe(12)
    expect(series.find((s) => s.name === SERIES_NAMES.unitMeans)!.data).toHaveLength(4)
    const naive = series.find((s) => s.name === SERIES_NAMES.naive)!.data as number[][]
    const nested = series.find((s) => s.name === SERIES_NAMES.nested)!.data as number[][]
    expect(naive.map((d) => d[0])).toEqual([SLOT.naive, 1 + SLOT.naive])
    expect(nested[0]).toEqual([SLOT.nested, 8.5, 11.5, 10])
  })

  it('leaves out a nested SD bar that cannot be computed', () => {
    const series = mainChartOption(chart, 'sd', colors).series as Series[]
    expect(series.find((s) => s.name === SERIES_NAMES.nested)!.data).toHaveLength(1)
  })
})

describe('unit styles', () => {
  it('repeat hues with a new shape past the palette', () => {
    expect(unitStyle(0).color).toBe(unitStyle(UNIT_HUES.length).color)
    expect(unitStyle(0).symbol).not.toBe(unitStyle(UNIT_HUES.length).symbol)
    expect(new Set(Array.from({ length: 28 }, (_, i) => unitStyle(i).styleIndex)).size).toBe(28)
  })
})

describe('mainChartOption for binary and count responses', () => {
  // Invented: the same two conditions, now as proportions of yes per unit.
  const binary: ChartData = {
    ...chart,
    family: 'binomial',
    conditions: chart.conditions.map((c) => ({
      ...c,
      naive: { estimate: 0.4, se: 0.05, df: null, ci: [0.31, 0.5], sd: 0.49 },
      nested: { estimate: 0.38, se: 0.08, df: null, ci: [0.24, 0.55], sd: 0.1, nUnits: 2 },
    })),
  }
  type Series = { name: string; data: unknown[] }
  const seriesOf = (option: ReturnType<typeof mainChartOption>) => option.series as Series[]

  it('draws units as proportions on a 0–1 axis, without the single 0/1 observations', () => {
    const option = mainChartOption(binary, 'sem', colors, { yName: 'proportion “positive”' })
    const names = seriesOf(option).map((s) => s.name)
    expect(names).not.toContain(SERIES_NAMES.observations)
    expect(names).toContain('Unit proportions')
    expect(option.yAxis).toMatchObject({ min: 0, max: 1, scale: false, name: 'proportion “positive”' })
  })

  it('always shows the 95% intervals on the response scale, whatever bar was asked for', () => {
    for (const asked of ['sem', 'sd', 'ci95'] as const) {
      const nested = seriesOf(mainChartOption(binary, asked, colors)).find(
        (s) => s.name === SERIES_NAMES.nested,
      )!
      expect(nested.data[0]).toEqual([0 + SLOT.nested, 0.24, 0.55, 0.38])
    }
  })

  it('keeps the observations of a count response, on an axis from 0', () => {
    const counts = mainChartOption({ ...binary, family: 'poisson' }, 'ci95', colors)
    expect(seriesOf(counts).some((s) => s.name === SERIES_NAMES.observations)).toBe(true)
    expect(counts.yAxis).toMatchObject({ min: 0, scale: false })
  })
})
