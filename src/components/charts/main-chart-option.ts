import type {
  CustomSeriesRenderItemAPI,
  CustomSeriesRenderItemParams,
  CustomSeriesRenderItemReturn,
} from 'echarts'
import type { EChartsCoreOption } from 'echarts/core'
import type { ChartData, ErrorBarType, UnitSummary } from '../../../shared/schemas/analyses'
import { formatNumber } from '../../../shared/report/number-format'
import { termLabel } from '../../../shared/report/words'
import { ERROR_BAR_WORDS, naiveBar, nestedBar, type Bar } from './error-bars'
import { chartHtml } from './chart-text'
import type { ChartColors } from './chart-colors'
import { responseYAxis, slotXAxis, whiskerLines } from './slot-axes'
import { UNIT_HUES, UNIT_SYMBOLS } from './unit-style'

export type { ChartColors } from './chart-colors'

/** Where things sit within a condition's slot of width 1 centred on its index. */
export const SLOT = { unitsFrom: -0.34, unitsTo: 0.04, jitter: 0.035, naive: 0.18, nested: 0.32 } as const
/** Room left between the units of two outer groups (a share of the units' span). */
const GROUP_GAP = 0.6

export const SERIES_NAMES = {
  observations: 'Observations',
  unitMeans: 'Unit means',
  naive: 'Naive error bar',
  nested: 'Nested error bar',
} as const

/** A fixed pseudo-random jitter per point, so the picture is the same each time it is drawn. */
function jitter(i: number): number {
  const x = Math.sin(i * 12.9898 + 78.233) * 43758.5453
  return (x - Math.floor(x)) * 2 - 1
}

export interface PlacedUnit {
  unit: UnitSummary
  /** Index into the units of the points' level (what the points' `cell` refers to). */
  index: number
  x: number
  /** The unit's outer group (its label at the outermost level), or null without an outer level. */
  group: string | null
  /** Index of that group in `groupsOf(chart).labels`; 0 without an outer level. */
  groupIndex: number
}

export interface ChartGroups {
  /** The outermost level's name ("site"), or null when the points' level is the outermost. */
  level: string | null
  /** Its labels in order of first appearance: each gets one colour (and shape past seven). */
  labels: string[]
}

/**
 * How the chart colours units: by the outermost level above the points' level (site, lab, day),
 * so 24 mice in 3 sites read as 3 colours, each mouse a column of marks inside its site's block.
 * Without a level above, one colour: position alone tells units apart.
 */
export function groupsOf(chart: ChartData): ChartGroups {
  const names = chart.unitLevels.map((l) => l.level)
  const own = names.indexOf(chart.points.level)
  const level = own > 0 ? names[0] : null
  const units = chart.unitLevels[Math.max(0, own)]?.units ?? []
  const labels = level === null ? [] : [...new Set(units.map((u) => u.path[0] ?? ''))]
  return { level, labels }
}

/** A unit mean's hover: "mean of 12 observations", "proportion of 30 observations", "7 of 40 trials". */
function unitMeanWords(chart: ChartData, unit: UnitSummary | undefined): string {
  const n = unit?.n ?? '?'
  if (chart.family === 'binomial')
    return unit?.trials !== undefined
      ? `${Math.round(unit.mean * unit.trials)} of ${unit.trials} trials`
      : `proportion of ${n} observations`
  if (chart.family === 'poisson') return `rate per observation, over ${n} observations`
  return `mean of ${n} observations`
}

/** Colour and marker of an outer group: seven colour-blind-safe hues, then the hues again with another shape. */
export function groupStyle(index: number): { color: string; symbol: string } {
  return {
    color: UNIT_HUES[index % UNIT_HUES.length],
    symbol: UNIT_SYMBOLS[Math.floor(index / UNIT_HUES.length) % UNIT_SYMBOLS.length],
  }
}

/**
 * The units of the points' level, each at an x inside its condition's slot; the units of one
 * outer group sit next to each other, with a gap between groups.
 */
export function placeUnits(chart: ChartData): PlacedUnit[] {
  const level = chart.unitLevels.find((l) => l.level === chart.points.level)
  if (!level) return []
  const { level: outer, labels } = groupsOf(chart)
  const groupIndex = new Map(labels.map((label, i) => [label, i]))
  const conditionIndex = new Map(chart.conditions.map((c, i) => [c.condition, i]))
  const slotOf = (u: UnitSummary) => conditionIndex.get(u.condition ?? 'all') ?? 0
  const placed: PlacedUnit[] = level.units.map((unit, index) => ({
    unit,
    index,
    x: 0,
    group: outer === null ? null : (unit.path[0] ?? ''),
    groupIndex: outer === null ? 0 : (groupIndex.get(unit.path[0] ?? '') ?? 0),
  }))
  const bySlot = new Map<number, PlacedUnit[]>()
  for (const p of placed) {
    const slot = slotOf(p.unit)
    bySlot.set(slot, [...(bySlot.get(slot) ?? []), p])
  }
  for (const [slot, members] of bySlot) {
    // Stable sort: by group, then as listed.
    members.sort((a, b) => a.groupIndex - b.groupIndex || a.index - b.index)
    const gaps = new Set(members.map((m) => m.groupIndex)).size - 1
    const steps = members.length + gaps * GROUP_GAP
    let position = 0.5
    members.forEach((m, k) => {
      if (k > 0 && m.groupIndex !== members[k - 1].groupIndex) position += GROUP_GAP
      m.x = slot + SLOT.unitsFrom + (position / steps) * (SLOT.unitsTo - SLOT.unitsFrom)
      position += 1
    })
  }
  return placed
}

type BarDatum = [x: number, low: number, high: number, mean: number]

function errorBarRenderer(color: string, width: number, label: string) {
  return (
    _params: CustomSeriesRenderItemParams,
    api: CustomSeriesRenderItemAPI,
  ): CustomSeriesRenderItemReturn => {
    const x = api.value(0) as number
    const top = api.coord([x, api.value(2) as number])
    const bottom = api.coord([x, api.value(1) as number])
    const mid = api.coord([x, api.value(3) as number])
    const cap = 7
    const style = { stroke: color, lineWidth: width }
    return {
      type: 'group',
      children: [
        ...whiskerLines(top, bottom, cap, style),
        {
          type: 'rect',
          shape: { x: mid[0] - 5, y: mid[1] - 5, width: 10, height: 10 },
          style: { fill: color },
        },
        {
          type: 'text',
          x: top[0],
          y: top[1] - 6,
          style: { text: label, fill: color, align: 'center', verticalAlign: 'bottom', fontSize: 11 },
        },
      ],
    }
  }
}

/** One kind of error bar across the conditions; the nested kind is drawn thicker and on top. */
function errorBarSeries(
  kind: 'naive' | 'nested',
  data: BarDatum[],
  colors: ChartColors,
  lineWidth: number,
  words: string,
  z: number,
) {
  return {
    type: 'custom',
    name: SERIES_NAMES[kind],
    data,
    renderItem: errorBarRenderer(colors[kind], lineWidth, `${kind} ${words}`),
    encode: { x: 0, y: [1, 2] },
    z,
    itemStyle: { color: colors[kind] },
  }
}

/** How many units and observations the chart rests on, for exported figures: "n = 1,341 observations in 24 units of “mouse”". */
export function chartCounts(chart: ChartData): { observations: number; units: number; groups: number } {
  const level = chart.unitLevels.find((l) => l.level === chart.points.level)
  const units = new Set((level?.units ?? []).map((u) => u.label)).size
  return { observations: chart.points.nTotal, units, groups: groupsOf(chart).labels.length }
}

/** What the y axis shows, when the response's name alone would not say it (binary and count responses). */
export interface MainChartWords {
  /** The y axis name, e.g. "proportion “positive” of marker" or "puncta per observation". */
  yName?: string
}

/**
 * The main chart: every sampled observation, each unit's mean as a larger outlined marker, and
 * per condition the naive bar beside the nested one. Colour is the outer group (site, lab) with a
 * short legend that hides or shows a group; a column of marks is one unit. Tooltips name the unit
 * and its group, escaped (chartHtml). Pure: data in, option out.
 *
 * Binary and count responses (chart.family): each unit is drawn as its proportion or rate, single
 * yes/no observations are not drawn (they are all 0 or 1), and the bars are always the 95 %
 * intervals on the response scale (the model's Wald interval, back-transformed), whatever
 * `requested` says: an SEM or SD on the proportion scale would not be the interval the model gives.
 */
export function mainChartOption(
  chart: ChartData,
  requested: ErrorBarType,
  colors: ChartColors,
  text: MainChartWords = {},
): EChartsCoreOption {
  const type: ErrorBarType = chart.family ? 'ci95' : requested
  const proportion = chart.family === 'binomial'
  const unitMeansName =
    chart.family === 'binomial'
      ? 'Unit proportions'
      : chart.family === 'poisson'
        ? 'Unit rates'
        : SERIES_NAMES.unitMeans
  const placed = placeUnits(chart)
  const groups = groupsOf(chart)
  const words = ERROR_BAR_WORDS[type].short
  const grouped = groups.level !== null
  /** Series (and legend) name of a group: its label, or the plain names without groups. */
  const nameOf = (groupIndex: number, kind: 'observations' | 'unitMeans') =>
    grouped ? groups.labels[groupIndex] : kind === 'unitMeans' ? unitMeansName : SERIES_NAMES[kind]
  const styleOf = (groupIndex: number) =>
    grouped ? groupStyle(groupIndex) : { color: UNIT_HUES[0], symbol: 'circle' }

  const observations = new Map<number, [number, number, number][]>()
  const { y, cell } = chart.points
  for (let i = 0; i < y.length; i++) {
    const unit = placed[cell[i]]
    if (!unit) continue
    const list = observations.get(unit.groupIndex) ?? []
    list.push([unit.x + jitter(i) * SLOT.jitter, y[i], unit.index])
    observations.set(unit.groupIndex, list)
  }

  const naive: BarDatum[] = []
  const nested: BarDatum[] = []
  chart.conditions.forEach((c, i) => {
    const push = (list: BarDatum[], offset: number, bar: Bar | null) => {
      if (bar) list.push([i + offset, bar.low, bar.high, bar.mean])
    }
    push(naive, SLOT.naive, naiveBar(c, type))
    push(nested, SLOT.nested, nestedBar(c, type))
  })

  const groupIndices = grouped ? groups.labels.map((_, i) => i) : [0]
  // Single yes/no observations are all 0 or 1: drawing them would only hide the unit proportions.
  const observationSeries = (proportion ? [] : groupIndices).map((g) => {
    const data = observations.get(g) ?? []
    return {
      type: 'scatter',
      name: nameOf(g, 'observations'),
      id: `observations-${g}`,
      data,
      symbol: styleOf(g).symbol,
      symbolSize: 5,
      itemStyle: { color: styleOf(g).color, opacity: 0.45 },
      emphasis: { disabled: true },
      large: data.length > 2000,
      animation: false,
    }
  })
  const unitMeanSeries = groupIndices.map((g) => ({
    type: 'scatter',
    name: nameOf(g, 'unitMeans'),
    id: `unit-means-${g}`,
    symbolSize: 13,
    symbol: styleOf(g).symbol,
    z: 4,
    data: placed.filter((p) => p.groupIndex === g).map((p) => [p.x, p.unit.mean, p.index]),
    itemStyle: { color: styleOf(g).color, borderColor: colors.text, borderWidth: 1.5 },
    animation: false,
  }))

  const legendData = [
    ...(grouped
      ? groups.labels.map((label, g) => ({
          name: label,
          icon: styleOf(g).symbol,
          itemStyle: { color: styleOf(g).color },
        }))
      : [
          ...(proportion
            ? []
            : [
                {
                  name: SERIES_NAMES.observations,
                  icon: 'circle',
                  itemStyle: { color: UNIT_HUES[0], opacity: 0.45 },
                },
              ]),
          {
            name: unitMeansName,
            icon: 'circle',
            itemStyle: { color: UNIT_HUES[0], borderColor: colors.text },
          },
        ]),
    { name: SERIES_NAMES.naive, icon: 'rect', itemStyle: { color: colors.naive } },
    { name: SERIES_NAMES.nested, icon: 'rect', itemStyle: { color: colors.nested } },
  ]

  const conditionNames = chart.conditions.map((c) => c.condition)
  return {
    backgroundColor: 'transparent',
    animation: false,
    textStyle: { color: colors.text },
    grid: { left: 64, right: 24, top: 56, bottom: 48 },
    legend: {
      top: 4,
      type: 'scroll',
      textStyle: { color: colors.text },
      // Groups first, titled by their level ("site: Nimbus"), then the two error bars.
      formatter: (name: string) =>
        grouped && groups.labels.includes(name) ? `${groups.level}: ${name}` : name,
      data: legendData,
    },
    tooltip: {
      trigger: 'item',
      formatter: (p: { seriesName: string; seriesId?: string; value: number[] }) => {
        if (p.seriesName === SERIES_NAMES.naive || p.seriesName === SERIES_NAMES.nested) {
          const [, low, high, mean] = p.value
          return chartHtml`${p.seriesName} (${words})<br>mean ${formatNumber(mean)}, ${formatNumber(low)} to ${formatNumber(high)}`
        }
        const place = placed[p.value[2]]
        const unit = place?.unit
        const what = p.seriesId?.startsWith('unit-means') ? unitMeanWords(chart, unit) : 'observation'
        return chartHtml`${unit?.label ?? ''}${unit?.condition ? ` · ${unit.condition}` : ''}<br>${what}: ${formatNumber(p.value[1])}`
      },
    },
    // Two factors: the cells "a:b" of "A:B", named "A × B".
    xAxis: slotXAxis(conditionNames, chart.condition ? termLabel(chart.condition) : '', colors),
    yAxis: {
      ...responseYAxis(text.yName ?? chart.response, colors),
      // Proportions live in [0, 1] and rates start at 0: a cut axis would exaggerate differences.
      scale: !chart.family,
      ...(proportion ? { min: 0, max: 1 } : chart.family ? { min: 0 } : {}),
    },
    series: [
      ...observationSeries,
      ...unitMeanSeries,
      errorBarSeries('naive', naive, colors, 1.5, words, 5),
      errorBarSeries('nested', nested, colors, 3, words, 6),
    ],
  }
}
