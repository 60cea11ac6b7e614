import { describe, expect, it } from 'vitest'
import type { ChartData } from '../../../shared/schemas/analyses'
import {
  chartCounts,
  groupStyle,
  groupsOf,
  mainChartOption,
  placeUnits,
  SERIES_NAMES,
  SLOT,
  type ChartColors,
} from './main-chart-option'
import { UNIT_HUES } from './unit-style'

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

type Series = { name: string; id?: string; type: string; data: unknown[]; itemStyle?: { color: string } }

/** Invented: 24 mice in 3 sites, 4 per site and arm, two observations each. */
function threeSites(siteNames = ['Nimbus', 'Fernhill', 'Larkspur']): ChartData {
  const units = siteNames.flatMap((site, s) =>
    ['vehicle', 'drug'].flatMap((condition, c) =>
      [0, 1, 2, 3].map((k) => ({
        path: [site, `m${s}${c}${k}`],
        label: `${site} / m${s}${c}${k}`,
        condition,
        n: 2,
        mean: 10 + c + k / 10,
        sd: 1,
      })),
    ),
  )
  return {
    ...chart,
    conditionLevel: 'mouse',
    unitLevels: [
      { level: 'site', roles: ['outer'], units: [] },
      { level: 'mouse', roles: ['condition-level', 'innermost'], units },
    ],
    points: {
      level: 'mouse',
      limit: 5000,
      nTotal: 48,
      nShown: 48,
      seed: 's',
      y: units.flatMap((u) => [u.mean - 0.5, u.mean + 0.5]),
      cell: units.flatMap((_, i) => [i, i]),
    },
  }
}

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
    const points = series.filter((s) => s.id?.startsWith('observations'))
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

describe('colour by the outer level', () => {
  it('gives 24 mice in 3 sites three colours and a legend of three sites and two bars', () => {
    const data = threeSites()
    expect(groupsOf(data)).toEqual({ level: 'site', labels: ['Nimbus', 'Fernhill', 'Larkspur'] })
    const option = mainChartOption(data, 'sem', colors) as {
      series: Series[]
      legend: { data: { name: string }[]; formatter: (name: string) => string }
    }
    const observations = option.series.filter((s) => s.id?.startsWith('observations'))
    expect(observations.map((s) => [s.name, s.itemStyle!.color])).toEqual([
      ['Nimbus', UNIT_HUES[0]],
      ['Fernhill', UNIT_HUES[1]],
      ['Larkspur', UNIT_HUES[2]],
    ])
    expect(option.legend.data.map((d) => d.name)).toEqual([
      'Nimbus',
      'Fernhill',
      'Larkspur',
      SERIES_NAMES.naive,
      SERIES_NAMES.nested,
    ])
    expect(option.legend.formatter('Fernhill')).toBe('site: Fernhill')
    // Each site's means are drawn in its own colour, so the legend hides a site's marks and means.
    const means = option.series.filter((s) => s.id?.startsWith('unit-means'))
    expect(means.map((s) => s.name)).toEqual(['Nimbus', 'Fernhill', 'Larkspur'])
    expect(means.reduce((n, s) => n + s.data.length, 0)).toBe(24)
    expect(chartCounts(data)).toEqual({ observations: 48, units: 24, groups: 3 })
  })

  it('puts the mice of one site side by side in each condition, a gap between sites', () => {
    const placed = placeUnits(threeSites()).filter((p) => p.unit.condition === 'vehicle')
    const inOrder = [...placed].sort((a, b) => a.x - b.x)
    expect(inOrder.map((p) => p.group)).toEqual([
      ...Array(4).fill('Nimbus'),
      ...Array(4).fill('Fernhill'),
      ...Array(4).fill('Larkspur'),
    ])
    const steps = inOrder.slice(1).map((p, i) => p.x - inOrder[i].x)
    expect(steps[3]).toBeGreaterThan(steps[0] * 1.5)
    for (const p of placed) {
      expect(p.x).toBeGreaterThanOrEqual(SLOT.unitsFrom)
      expect(p.x).toBeLessThanOrEqual(SLOT.unitsTo)
    }
  })

  it('uses one colour and plain names without an outer level', () => {
    const option = mainChartOption(chart, 'sem', colors) as { series: Series[] }
    const names = new Set(option.series.map((s) => s.name))
    expect(names).toEqual(
      new Set([SERIES_NAMES.observations, SERIES_NAMES.unitMeans, SERIES_NAMES.naive, SERIES_NAMES.nested]),
    )
  })

  it('repeats hues with a new shape past seven groups', () => {
    expect(groupStyle(0).color).toBe(groupStyle(UNIT_HUES.length).color)
    expect(groupStyle(0).symbol).not.toBe(groupStyle(UNIT_HUES.length).symbol)
  })

  it('escapes labels from the table in its tooltips', () => {
    const data = threeSites(['<img src=x onerror=alert(1)>', 'B', 'C'])
    const option = mainChartOption(data, 'sem', colors) as {
      tooltip: { formatter: (p: object) => string }
    }
    const html = option.tooltip.formatter({ seriesName: 'x', seriesId: 'unit-means-0', value: [0, 10, 0] })
    expect(html).toContain('&lt;img src=x onerror=alert(1)&gt;')
    expect(html).not.toContain('<img')
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
