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
import { unitStyle } from './unit-style'

export interface ChartColors {
  text: string
  muted: string
  grid: string
  naive: string
  nested: string
  background: string
}

/** Where things sit within a condition's slot of width 1 centred on its index. */
export const SLOT = { unitsFrom: -0.34, unitsTo: 0.04, jitter: 0.035, naive: 0.18, nested: 0.32 } as const

export const SERIES_NAMES = {
  observations: 'Observations (colour = unit)',
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
  index: number
  x: number
}

/** The units of the points' level, each at an x inside its condition's slot. */
export function placeUnits(chart: ChartData): PlacedUnit[] {
  const level = chart.unitLevels.find((l) => l.level === chart.points.level)
  if (!level) return []
  const conditionIndex = new Map(chart.conditions.map((c, i) => [c.condition, i]))
  const perCondition = new Map<number, number>()
  const counts = new Map<number, number>()
  const slotOf = (u: UnitSummary) => conditionIndex.get(u.condition ?? 'all') ?? 0
  for (const u of level.units) counts.set(slotOf(u), (counts.get(slotOf(u)) ?? 0) + 1)
  return level.units.map((unit, index) => {
    const slot = slotOf(unit)
    const k = perCondition.get(slot) ?? 0
    perCondition.set(slot, k + 1)
    const n = counts.get(slot) ?? 1
    const x = slot + SLOT.unitsFrom + ((k + 0.5) / n) * (SLOT.unitsTo - SLOT.unitsFrom)
    return { unit, index, x }
  })
}

type BarDatum = [x: number, low: number, high: number, mean: number]

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
        { type: 'line', shape: { x1: top[0], y1: top[1], x2: bottom[0], y2: bottom[1] }, style },
        { type: 'line', shape: { x1: top[0] - cap, y1: top[1], x2: top[0] + cap, y2: top[1] }, style },
        {
          type: 'line',
          shape: { x1: bottom[0] - cap, y1: bottom[1], x2: bottom[0] + cap, y2: bottom[1] },
          style,
        },
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

/** What the y axis shows, when the response's name alone would not say it (binary and count responses). */
export interface MainChartWords {
  /** The y axis name, e.g. "proportion “positive” of marker" or "puncta per observation". */
  yName?: string
}

/**
 * The main chart: every sampled observation coloured by its unit, each unit's mean as a larger
 * marker, and per condition the naive bar beside the nested one. Pure: data in, option out.
 *
 * Binary and count responses (chart.family): each unit is drawn as its proportion or rate, single
 * yes/no observations are not drawn (they are all 0 or 1), and the bars are always the 95 %
 * intervals on the response scale (the model's Wald interval, back-transformed), whatever `type`
 * says: an SEM or SD on the proportion scale would not be the interval the model gives.
 */
export function mainChartOption(
  chart: ChartData,
  requested: ErrorBarType,
  colors: ChartColors,
  text: MainChartWords = {},
): EChartsCoreOption {
  const placed = placeUnits(chart)
  const type: ErrorBarType = chart.family ? 'ci95' : requested
  const words = ERROR_BAR_WORDS[type].short
  const proportion = chart.family === 'binomial'
  const unitSeriesName =
    chart.family === 'binomial'
      ? 'Unit proportions'
      : chart.family === 'poisson'
        ? 'Unit rates'
        : SERIES_NAMES.unitMeans

  // Observations grouped by look (colour × shape) so a thousand points are a few plain arrays.
  const byStyle = new Map<number, { color: string; symbol: string; data: [number, number, number][] }>()
  const { y, cell } = chart.points
  for (let i = 0; i < (proportion ? 0 : y.length); i++) {
    const unit = placed[cell[i]]
    if (!unit) continue
    const look = unitStyle(unit.index)
    let group = byStyle.get(look.styleIndex)
    if (!group) {
      group = { color: look.color, symbol: look.symbol, data: [] }
      byStyle.set(look.styleIndex, group)
    }
    group.data.push([unit.x + jitter(i) * SLOT.jitter, y[i], unit.index])
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

  const observationSeries = [...byStyle.values()].map((g) => ({
    type: 'scatter',
    name: SERIES_NAMES.observations,
    data: g.data,
    symbol: g.symbol,
    symbolSize: 5,
    itemStyle: { color: g.color, opacity: 0.45 },
    emphasis: { disabled: true },
    large: g.data.length > 2000,
    animation: false,
  }))

  const unitMeanSeries = {
    type: 'scatter',
    name: unitSeriesName,
    symbolSize: 13,
    z: 4,
    data: placed.map((p) => {
      const look = unitStyle(p.index)
      return {
        value: [p.x, p.unit.mean, p.index],
        symbol: look.symbol,
        itemStyle: { color: look.color, borderColor: colors.text, borderWidth: 1.5 },
      }
    }),
    itemStyle: { color: colors.muted, borderColor: colors.text, borderWidth: 1.5 },
    animation: false,
  }

  const conditionNames = chart.conditions.map((c) => c.condition)
  return {
    backgroundColor: 'transparent',
    animation: false,
    textStyle: { color: colors.text },
    grid: { left: 64, right: 24, top: 56, bottom: 48 },
    legend: {
      top: 4,
      textStyle: { color: colors.text },
      data: [
        ...(proportion
          ? []
          : [{ name: SERIES_NAMES.observations, icon: 'circle', itemStyle: { color: colors.muted } }]),
        {
          name: unitSeriesName,
          icon: 'circle',
          itemStyle: { color: colors.muted, borderColor: colors.text },
        },
        { name: SERIES_NAMES.naive, icon: 'rect', itemStyle: { color: colors.naive } },
        { name: SERIES_NAMES.nested, icon: 'rect', itemStyle: { color: colors.nested } },
      ],
    },
    tooltip: {
      trigger: 'item',
      formatter: (p: { seriesName: string; value: number[] }) => {
        if (p.seriesName === SERIES_NAMES.naive || p.seriesName === SERIES_NAMES.nested) {
          const [, low, high, mean] = p.value
          return `${p.seriesName} (${words})<br>mean ${formatNumber(mean)}, ${formatNumber(low)} to ${formatNumber(high)}`
        }
        const unit = placed[p.value[2]]?.unit
        const what = p.seriesName !== unitSeriesName ? 'observation' : unitMeanWords(chart, unit)
        return `${unit?.label ?? ''}${unit?.condition ? ` · ${unit.condition}` : ''}<br>${what}: ${formatNumber(p.value[1])}`
      },
    },
    xAxis: {
      type: 'value',
      min: -0.5,
      max: conditionNames.length - 0.5,
      interval: 1,
      splitLine: { show: false },
      axisTick: { show: false },
      axisLine: { lineStyle: { color: colors.grid } },
      // Labels at each condition's centre, not at the slot edges the value axis would pick.
      axisLabel: {
        color: colors.text,
        fontSize: 13,
        customValues: conditionNames.map((_, i) => i),
        formatter: (value: number) => conditionNames[Math.round(value)] ?? '',
      },
      // Two factors: the cells "a:b" of "A:B", named "A × B".
      name: chart.condition ? termLabel(chart.condition) : '',
      nameLocation: 'middle',
      nameGap: 30,
    },
    yAxis: {
      type: 'value',
      // Proportions live in [0, 1] and rates start at 0: a cut axis would exaggerate differences.
      scale: !chart.family,
      ...(proportion ? { min: 0, max: 1 } : chart.family ? { min: 0 } : {}),
      name: text.yName ?? chart.response,
      nameLocation: 'middle',
      nameGap: 48,
      axisLabel: { color: colors.text },
      // Keep the axis at the left edge instead of crossing the first condition at x = 0.
      axisLine: { onZero: false, show: true, lineStyle: { color: colors.grid } },
      splitLine: { lineStyle: { color: colors.grid, opacity: 0.5 } },
    },
    series: [
      ...observationSeries,
      unitMeanSeries,
      errorBarSeries('naive', naive, colors, 1.5, words, 5),
      errorBarSeries('nested', nested, colors, 3, words, 6),
    ],
  }
}
