import type { EChartsCoreOption } from 'echarts/core'
import type { ChartData } from '../../../shared/schemas/analyses'
import { formatNumber, formatShare } from '../../../shared/report/number-format'
import type { ChartColors } from './main-chart-option'

/** Plain name of a variance component: "residual" is the spread between observations of one unit. */
export function componentLabel(level: string): string {
  return level === 'residual' ? 'within units (residual)' : level
}

/** Horizontal bars: share of the total variance at each level, outer → inner, with each level's ICC. */
export function varianceChartOption(variance: ChartData['variance'], colors: ChartColors): EChartsCoreOption {
  const rows = [...variance.components].reverse()
  const icc = new Map(variance.icc.map((l) => [l.level, l.icc]))
  return {
    backgroundColor: 'transparent',
    animation: false,
    textStyle: { color: colors.text },
    grid: { left: 160, right: 120, top: 8, bottom: 28 },
    tooltip: {
      trigger: 'item',
      formatter: (p: { dataIndex: number }) => {
        const c = rows[p.dataIndex]
        const i = icc.get(c.level)
        return `${componentLabel(c.level)}: ${formatShare(c.share)} of the variance (${formatNumber(c.variance)})${
          i === undefined ? '' : `<br>ICC ${formatNumber(i, 2)}`
        }`
      },
    },
    xAxis: {
      type: 'value',
      max: 1,
      axisLabel: { color: colors.text, formatter: (v: number) => formatShare(v) },
      splitLine: { lineStyle: { color: colors.grid, opacity: 0.5 } },
    },
    yAxis: {
      type: 'category',
      data: rows.map((c) => componentLabel(c.level)),
      axisLabel: { color: colors.text, fontSize: 13 },
      axisTick: { show: false },
      axisLine: { lineStyle: { color: colors.grid } },
    },
    series: [
      {
        type: 'bar',
        data: rows.map((c) => ({
          value: c.share,
          itemStyle: { color: c.level === 'residual' ? colors.muted : colors.nested },
        })),
        barMaxWidth: 28,
        label: {
          show: true,
          position: 'right',
          color: colors.text,
          formatter: (p: { dataIndex: number }) => {
            const c = rows[p.dataIndex]
            const i = icc.get(c.level)
            return i === undefined
              ? formatShare(c.share)
              : `${formatShare(c.share)} · ICC ${formatNumber(i, 2)}`
          },
        },
      },
    ],
  }
}
