import type { EChartsCoreOption } from 'echarts/core'
import type { PlanResult } from '../../../shared/schemas/plans'

/** Okabe & Ito's colour-blind-safe hues (without black), one per curve; markers tell repeats apart. */
export const CURVE_HUES = ['#0072B2', '#E69F00', '#009E73', '#CC79A7', '#56B4E9', '#D55E00', '#B8A900']
const SYMBOLS = ['circle', 'rect', 'triangle', 'diamond']

export interface PlanChartColors {
  text: string
  muted: string
  grid: string
  accent: string
}

const axis = (colors: PlanChartColors, name: string, extra: object = {}) => ({
  name,
  nameLocation: 'middle',
  nameGap: 32,
  axisLine: { lineStyle: { color: colors.grid } },
  axisLabel: { color: colors.muted },
  nameTextStyle: { color: colors.text },
  splitLine: { lineStyle: { color: colors.grid, opacity: 0.5 } },
  ...extra,
})

const percent = (v: number) => `${Math.round(v * 100)} %`

/** Power against units per arm, one line per observations-per-unit value, with the target as a line. */
export function powerCurvesOption(
  result: PlanResult,
  target: number,
  colors: PlanChartColors,
): EChartsCoreOption {
  return {
    animation: false,
    grid: { left: 64, right: 24, top: 76, bottom: 52 },
    legend: { top: 0, textStyle: { color: colors.text }, itemGap: 12 },
    tooltip: { trigger: 'axis', valueFormatter: (v: unknown) => percent(Number(v)) },
    xAxis: axis(colors, 'independent units per arm', { type: 'value', min: 2 }),
    yAxis: axis(colors, 'power', {
      type: 'value',
      min: 0,
      max: 1,
      axisLabel: { color: colors.muted, formatter: percent },
    }),
    series: result.powerCurves.map((curve, i) => ({
      type: 'line',
      name: `m = ${curve.obsPerUnit}${curve.obsPerUnit === result.obsPerUnit ? ' (plan)' : ''}`,
      data: curve.points.map((p) => [p.unitsPerArm, p.power]),
      showSymbol: false,
      symbol: SYMBOLS[Math.floor(i / CURVE_HUES.length) % SYMBOLS.length],
      lineStyle: { width: curve.obsPerUnit === result.obsPerUnit ? 3 : 1.5 },
      color: CURVE_HUES[i % CURVE_HUES.length],
      ...(i === 0
        ? {
            markLine: {
              silent: true,
              symbol: 'none',
              lineStyle: { color: colors.accent, type: 'dashed' },
              label: { color: colors.accent },
              data: [
                {
                  yAxis: target,
                  label: { formatter: `target ${percent(target)}`, position: 'insideStartTop' },
                },
                {
                  xAxis: result.unitsPerArm,
                  label: { formatter: `${result.unitsPerArm} per arm`, position: 'end' },
                },
              ],
            },
          }
        : {}),
    })),
  }
}

export interface LabChartWords {
  /** The outer level, singular and plural ("lab", "labs"); the units likewise ("mouse", "mice"). */
  outer: string
  outers: string
  unit: string
  units: string
  /** Each lab runs one arm: the numbers of labs are per arm. */
  perArm: boolean
}

const plural = (n: number, word: string, pluralWord: string) => `${n} ${n === 1 ? word : pluralWord}`

/**
 * Power for several numbers of labs, against units per lab and arm ('units') or observations per
 * unit ('obs'), each line with its ceiling drawn as a dashed line of the same colour: the most that
 * many labs can reach however many units and observations they use. The recommendation is marked.
 */
export function labCurvesOption(
  result: PlanResult,
  target: number,
  colors: PlanChartColors,
  by: 'units' | 'obs',
  words: LabChartWords,
): EChartsCoreOption {
  const perArm = words.perArm ? ' per arm' : ''
  return {
    animation: false,
    grid: { left: 64, right: 56, top: 84, bottom: 52 },
    // A width makes a long legend wrap onto a second line instead of running off the chart.
    legend: { top: 0, left: 8, width: '92%', textStyle: { color: colors.text }, itemGap: 12 },
    tooltip: { trigger: 'axis', valueFormatter: (v: unknown) => percent(Number(v)) },
    xAxis: axis(
      colors,
      by === 'units' ? `${words.units} per ${words.outer} and arm` : `observations per ${words.unit}`,
      { type: 'value', min: 1 },
    ),
    yAxis: axis(colors, 'power', {
      type: 'value',
      min: 0,
      max: 1,
      axisLabel: { color: colors.muted, formatter: percent },
    }),
    series: result.labCurves.map((curve, i) => {
      const hue = CURVE_HUES[i % CURVE_HUES.length]
      const mine = curve.labs === result.labs
      const marks: object[] = []
      if (curve.ceilingPower < 0.999) {
        marks.push({
          yAxis: curve.ceilingPower,
          lineStyle: { color: hue, type: 'dashed', width: 1.5 },
          label: {
            color: hue,
            formatter: percent(curve.ceilingPower),
            position: 'end',
          },
        })
      }
      if (i === 0) {
        marks.push({
          yAxis: target,
          lineStyle: { color: colors.accent, type: 'dotted' },
          label: { color: colors.accent, formatter: `target ${percent(target)}`, position: 'insideStartTop' },
        })
      }
      return {
        type: 'line',
        name: `${plural(curve.labs, words.outer, words.outers)}${perArm}${mine ? ' (plan)' : ''}`,
        data:
          by === 'units'
            ? curve.byUnits.map((p) => [p.unitsPerArm, p.power])
            : curve.byObs.map((p) => [p.obsPerUnit, p.power]),
        showSymbol: false,
        symbol: SYMBOLS[Math.floor(i / CURVE_HUES.length) % SYMBOLS.length],
        lineStyle: { width: mine ? 3 : 1.5 },
        color: hue,
        ...(marks.length ? { markLine: { silent: true, symbol: 'none', data: marks } } : {}),
      }
    }),
  }
}

/**
 * At the recommended units per arm: what more observations per unit buy. Effective observations per
 * unit m / (1 + (m − 1)ρ) levels off at 1/ρ, and power with it.
 */
export function obsPerUnitOption(result: PlanResult, colors: PlanChartColors): EChartsCoreOption {
  const ceiling = result.icc > 0 ? 1 / result.icc : null
  return {
    animation: false,
    grid: { left: 64, right: 72, top: 56, bottom: 52 },
    legend: { top: 0, textStyle: { color: colors.text } },
    tooltip: { trigger: 'axis' },
    xAxis: axis(colors, 'observations per unit', { type: 'value', min: 1 }),
    yAxis: [
      axis(colors, 'power', {
        type: 'value',
        min: 0,
        max: 1,
        axisLabel: { color: colors.muted, formatter: percent },
      }),
      axis(colors, 'effective n', { type: 'value', min: 0, splitLine: { show: false }, nameGap: 36 }),
    ],
    series: [
      {
        type: 'line',
        name: 'power',
        data: result.obsCurve.map((p) => [p.obsPerUnit, p.power]),
        showSymbol: false,
        color: CURVE_HUES[0],
        lineStyle: { width: 2.5 },
        tooltip: { valueFormatter: (v: unknown) => percent(Number(v)) },
      },
      {
        type: 'line',
        name: 'effective n per unit',
        yAxisIndex: 1,
        data: result.obsCurve.map((p) => [p.obsPerUnit, p.effectivePerUnit]),
        showSymbol: false,
        color: CURVE_HUES[1],
        lineStyle: { width: 2, type: 'dashed' },
        tooltip: { valueFormatter: (v: unknown) => Number(v).toFixed(1) },
        ...(ceiling !== null && ceiling < 1000
          ? {
              markLine: {
                silent: true,
                symbol: 'none',
                lineStyle: { color: colors.muted, type: 'dotted' },
                label: {
                  color: colors.muted,
                  formatter: `ceiling 1/ICC = ${ceiling.toFixed(1)}`,
                  position: 'insideEndTop',
                },
                data: [{ yAxis: ceiling }],
              },
            }
          : {}),
      },
    ],
  }
}

/** Tab-separated designs, for pasting into a spreadsheet or a protocol. */
export function planTableText(result: PlanResult, arms: number): string {
  const multiLab = result.labCurves.length > 0
  const header = [
    ...(multiLab ? [result.design === 'one-arm' ? 'labs per arm' : 'labs'] : []),
    multiLab ? 'units per lab and arm' : 'units per arm',
    'observations per unit',
    'total units',
    'total observations',
    'power',
    'cost',
    'recommended',
  ]
  const rows = result.table.map((r) =>
    [
      ...(multiLab ? [r.labs] : []),
      r.unitsPerArm,
      r.obsPerUnit,
      r.unitsPerArm * arms * (multiLab ? r.labs : 1),
      r.unitsPerArm * arms * (multiLab ? r.labs : 1) * r.obsPerUnit,
      r.power.toFixed(3),
      r.cost === null ? '' : Math.round(r.cost),
      r.recommended ? 'yes' : '',
    ].join('\t'),
  )
  return [header.join('\t'), ...rows].join('\n')
}
