import { chartHtml, joinHtml } from './chart-text'
import type { EChartsCoreOption } from 'echarts/core'
import type { ChartData } from '../../../shared/schemas/analyses'
import type { RandomTerm } from '../../../shared/schemas/analysis-result'
import { formatNumber, formatShare } from '../../../shared/report/number-format'
import { componentLabel, factorWords, pluralOf } from '../../../shared/report/words'
import type { ChartColors } from './chart-colors'

/** What a level × condition component means, for its hover; null for a plain level. */
function componentMeaning(name: string, random: readonly RandomTerm[]): string | null {
  const term = random.find((r) => r.name === name)
  if (!term?.factor) return null
  return `how much the effect of ${factorWords(term.factor)} differs between ${pluralOf(term.level)}`
}

/**
 * Horizontal bars: share of the total variance at each component, outer → inner, with each
 * level's ICC. Level × condition components ("lab:treatment", engine ≥ 0.2) read "lab × treatment".
 */
export function varianceChartOption(
  variance: ChartData['variance'],
  colors: ChartColors,
  random: readonly RandomTerm[] = [],
): EChartsCoreOption {
  const rows = [...variance.components].reverse()
  const icc = new Map(variance.icc.map((l) => [l.level, l.icc]))
  const label = (level: string) => componentLabel(level, random)
  return {
    backgroundColor: 'transparent',
    animation: false,
    textStyle: { color: colors.text },
    // Room for the longest label ("lab × genotype × treatment"), at about 7 px a character.
    grid: {
      left: Math.min(280, Math.max(160, 24 + 7 * Math.max(...rows.map((c) => label(c.level).length)))),
      right: 120,
      top: 8,
      bottom: 28,
    },
    tooltip: {
      trigger: 'item',
      formatter: (p: { dataIndex: number }) => {
        const c = rows[p.dataIndex]
        const i = icc.get(c.level)
        const meaning = componentMeaning(c.level, random)
        return joinHtml([
          chartHtml`${label(c.level)}: ${formatShare(c.share)} of the variance (${formatNumber(c.variance)})`,
          ...(meaning ? [chartHtml`${meaning}`] : []),
          ...(i === undefined ? [] : [chartHtml`ICC ${formatNumber(i, 2)}`]),
        ])
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
      data: rows.map((c) => label(c.level)),
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
