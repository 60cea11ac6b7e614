import type { ChartColors } from './chart-colors'

/**
 * The x axis of a chart with one slot per label: a value axis from −0.5 to n − 0.5 (so marks can
 * sit beside each other inside a slot), each label at its slot's centre rather than at the slot
 * edges a value axis would pick.
 */
export function slotXAxis(labels: string[], name: string, colors: ChartColors) {
  return {
    type: 'value',
    min: -0.5,
    max: labels.length - 0.5,
    interval: 1,
    splitLine: { show: false },
    axisTick: { show: false },
    axisLine: { lineStyle: { color: colors.grid } },
    axisLabel: {
      color: colors.text,
      fontSize: 13,
      customValues: labels.map((_, i) => i),
      formatter: (value: number) => labels[Math.round(value)] ?? '',
    },
    name,
    nameLocation: 'middle',
    nameGap: 30,
  }
}

/** The y axis of the response, kept at the left edge instead of crossing the first slot at x = 0. */
export function responseYAxis(name: string, colors: ChartColors) {
  return {
    type: 'value',
    scale: true,
    name,
    nameLocation: 'middle',
    nameGap: 48,
    axisLabel: { color: colors.text },
    axisLine: { onZero: false, show: true, lineStyle: { color: colors.grid } },
    splitLine: { lineStyle: { color: colors.grid, opacity: 0.5 } },
  }
}

/** The three lines of an interval whisker (a vertical from top to bottom, a cap at each end), in pixels. */
export function whiskerLines(
  top: number[],
  bottom: number[],
  cap: number,
  style: { stroke: string; lineWidth: number },
) {
  const line = (x1: number, y1: number, x2: number, y2: number) => ({
    type: 'line' as const,
    shape: { x1, y1, x2, y2 },
    style,
  })
  return [
    line(top[0], top[1], bottom[0], bottom[1]),
    line(top[0] - cap, top[1], top[0] + cap, top[1]),
    line(bottom[0] - cap, bottom[1], bottom[0] + cap, bottom[1]),
  ]
}
