import type {
  CustomSeriesRenderItemAPI,
  CustomSeriesRenderItemParams,
  CustomSeriesRenderItemReturn,
} from 'echarts'
import type { EChartsCoreOption } from 'echarts/core'
import type { AnalysisResult, GroupSummary } from '../../../shared/schemas/analysis-result'
import { formatInterval, formatNumber } from '../../../shared/report/number-format'
import type { ChartColors } from './chart-colors'
import { chartHtml, joinHtml } from './chart-text'
import { responseYAxis, slotXAxis, whiskerLines } from './slot-axes'
import { UNIT_HUES, UNIT_SYMBOLS } from './unit-style'

/** One design cell as the chart draws it: x index of the first factor's level, line of the second's. */
export interface InteractionPoint {
  x: number
  line: number
  group: GroupSummary
}

export interface InteractionLayout {
  xFactor: string
  lineFactor: string
  xLevels: string[]
  lineLevels: string[]
  points: InteractionPoint[]
}

/** Lines sit side by side within an x level, this far apart, so their intervals do not overlap. */
const DODGE = 0.09

/**
 * The design cells of a two-factor result placed for the interaction chart: x = levels of the
 * first factor, one line per level of the second. Null for one factor or none, or for a result
 * whose groups do not name their factor levels (engine 0.1).
 */
export function interactionLayout(result: AnalysisResult): InteractionLayout | null {
  const factors = result.factors ?? []
  if (factors.length !== 2) return null
  const [xf, lf] = factors
  const points: InteractionPoint[] = []
  for (const group of result.groups) {
    const levels = group.factorLevels
    if (!levels) continue
    const x = xf.labels.indexOf(levels[xf.name])
    const line = lf.labels.indexOf(levels[lf.name])
    if (x >= 0 && line >= 0) points.push({ x, line, group })
  }
  if (points.length === 0) return null
  return { xFactor: xf.name, lineFactor: lf.name, xLevels: xf.labels, lineLevels: lf.labels, points }
}

/** Colour and marker of a line: Okabe–Ito hues with a shape and a dash each, readable without colour. */
export function lineStyleOf(line: number) {
  return {
    color: UNIT_HUES[line % UNIT_HUES.length],
    symbol: UNIT_SYMBOLS[line % UNIT_SYMBOLS.length],
    dash: line % 2 === 0 ? ('solid' as const) : ('dashed' as const),
  }
}

function intervalRenderer(color: string) {
  return (_p: CustomSeriesRenderItemParams, api: CustomSeriesRenderItemAPI): CustomSeriesRenderItemReturn => {
    const x = api.value(0) as number
    const top = api.coord([x, api.value(2) as number])
    const bottom = api.coord([x, api.value(1) as number])
    const style = { stroke: color, lineWidth: 2 }
    const cap = 5
    return {
      type: 'group',
      children: [...whiskerLines(top, bottom, cap, style)],
    }
  }
}

/**
 * The interaction chart: each design cell's model mean with its nested 95 % CI (from the mixed
 * model, Satterthwaite df), x = levels of the first factor, one line per level of the second.
 * Lines that are not parallel are what an interaction looks like. Pure: layout in, option out.
 */
export function interactionChartOption(
  layout: InteractionLayout,
  response: string,
  colors: ChartColors,
): EChartsCoreOption {
  const { xFactor, lineFactor, xLevels, lineLevels, points } = layout
  const offset = (line: number) => (line - (lineLevels.length - 1) / 2) * DODGE
  const series = lineLevels.flatMap((level, line) => {
    const look = lineStyleOf(line)
    const name = `${lineFactor} = ${level}`
    const mine = points.filter((p) => p.line === line).sort((a, b) => a.x - b.x)
    const at = (p: InteractionPoint) => p.x + offset(line)
    return [
      {
        type: 'line',
        name,
        data: mine.map((p) => [at(p), p.group.clustered.estimate, points.indexOf(p)]),
        symbol: look.symbol,
        symbolSize: 10,
        lineStyle: { color: look.color, width: 2, type: look.dash },
        itemStyle: { color: look.color },
        z: 4,
      },
      {
        type: 'custom',
        name,
        data: mine.map((p) => [at(p), p.group.clustered.ciLow, p.group.clustered.ciHigh, points.indexOf(p)]),
        renderItem: intervalRenderer(look.color),
        encode: { x: 0, y: [1, 2] },
        itemStyle: { color: look.color },
        z: 3,
        tooltip: { show: false },
      },
    ]
  })
  return {
    backgroundColor: 'transparent',
    animation: false,
    textStyle: { color: colors.text },
    grid: { left: 64, right: 24, top: 48, bottom: 48 },
    legend: {
      top: 4,
      textStyle: { color: colors.text },
      data: lineLevels.map((level, line) => ({
        name: `${lineFactor} = ${level}`,
        icon: lineStyleOf(line).symbol,
      })),
    },
    tooltip: {
      trigger: 'item',
      formatter: (p: { value: number[] }) => {
        const point = points[p.value[2]]
        if (!point) return ''
        const g = point.group.clustered
        return joinHtml([
          chartHtml`${xFactor} = ${xLevels[point.x]}, ${lineFactor} = ${lineLevels[point.line]}`,
          chartHtml`model mean ${formatNumber(g.estimate)}, nested 95% CI ${formatInterval(g.ciLow, g.ciHigh)}`,
          ...(point.group.nUnits === null ? [] : [chartHtml`${point.group.nUnits} independent units`]),
        ])
      },
    },
    xAxis: slotXAxis(xLevels, xFactor, colors),
    yAxis: responseYAxis(response, colors),
    series,
  }
}
