import type { EChartsCoreOption } from 'echarts/core'
import type { AgreementFlag, Critical } from '../../../shared/schemas/agreement'
import type { PlanChartColors } from '../planning/plan-chart-options'

export interface MandelBar {
  lab: string
  value: number | null
  flag: AgreementFlag | null
}

const FLAG_COLOR: Record<AgreementFlag, string> = { ok: '#0072B2', straggler: '#E69F00', outlier: '#D55E00' }

/**
 * Mandel's h or k per lab as bars, with the 5 % and 1 % critical values as lines (both signs for h).
 * Bar colour carries the flag (blue ok, orange straggler, vermilion outlier; Okabe & Ito hues) and
 * the label repeats it in words, so colour is never the only cue.
 */
export function mandelOption(
  bars: MandelBar[],
  critical: Critical,
  signed: boolean,
  colors: PlanChartColors,
): EChartsCoreOption {
  const lines = [
    // No text on the lines: they can nearly coincide (3 labs: h 1.151 and 1.155) and their labels
    // would sit on the bars; the caption says dashed 5 %, solid 1 %, and the tooltip gives values.
    { value: critical.fivePercent, label: '5 %', type: 'dashed' },
    { value: critical.onePercent, label: '1 %', type: 'solid' },
  ]
  const markData = lines.flatMap((l) => {
    const style = {
      lineStyle: { color: colors.accent, type: l.type },
      label: { show: false },
      name: `${l.label} critical value ${l.value.toFixed(3)}`,
    }
    return signed
      ? [
          { yAxis: l.value, ...style },
          { yAxis: -l.value, ...style },
        ]
      : [{ yAxis: l.value, ...style }]
  })
  const extent = Math.max(critical.onePercent * 1.15, ...bars.map((b) => Math.abs(b.value ?? 0) * 1.1))
  return {
    animation: false,
    grid: { left: 48, right: 40, top: 16, bottom: 40 },
    tooltip: { trigger: 'axis', valueFormatter: (v: unknown) => Number(v).toFixed(2) },
    xAxis: {
      type: 'category',
      data: bars.map((b) => b.lab),
      axisLabel: { color: colors.text },
      axisLine: { lineStyle: { color: colors.grid } },
    },
    yAxis: {
      type: 'value',
      min: signed ? -extent : 0,
      max: extent,
      axisLabel: { color: colors.muted, formatter: (v: number) => v.toFixed(1) },
      splitLine: { lineStyle: { color: colors.grid, opacity: 0.4 } },
    },
    series: [
      {
        type: 'bar',
        barMaxWidth: 56,
        data: bars.map((b) => ({
          value: b.value,
          itemStyle: { color: FLAG_COLOR[b.flag ?? 'ok'] },
          label: {
            show: true,
            position: (b.value ?? 0) < 0 ? 'bottom' : 'top',
            color: colors.text,
            formatter: () => `${(b.value ?? 0).toFixed(2)}${b.flag && b.flag !== 'ok' ? ` ${b.flag}` : ''}`,
          },
        })),
        markLine: { silent: true, symbol: 'none', data: markData },
      },
    ],
  }
}
