import { describe, expect, it } from 'vitest'
import { computePlan } from '../../../shared/planning/compute-plan'
import { consortium } from '../../../shared/planning/fixtures/consortium'
import { PlanInputs } from '../../../shared/schemas/plans'
import { labCurvesOption, planTableText } from './plan-chart-options'

const colors = { text: '#000', muted: '#666', grid: '#ccc', accent: '#c60' }
const words = { outer: 'lab', outers: 'labs', unit: 'mouse', units: 'mice', perArm: false }

const result = computePlan(PlanInputs.parse(consortium))

type Series = { name: string; data: number[][]; markLine?: { data: { yAxis: number }[] } }

describe('labCurvesOption', () => {
  it('draws one line per number of labs with its ceiling, against units per lab or observations per unit', () => {
    const option = labCurvesOption(result, 0.8, colors, 'units', words) as {
      series: Series[]
      xAxis: { name: string }
    }
    expect(option.xAxis.name).toBe('mice per lab and arm')
    expect(option.series.map((s) => s.name)).toEqual(
      result.labCurves.map((c) => `${c.labs} labs${c.labs === result.labs ? ' (plan)' : ''}`),
    )
    option.series.forEach((s, i) => {
      const curve = result.labCurves[i]
      expect(s.data).toEqual(curve.byUnits.map((p) => [p.unitsPerArm, p.power]))
      // A ceiling at (nearly) 100 % is not drawn: nothing caps that many labs.
      if (curve.ceilingPower < 0.999) expect(s.markLine!.data[0].yAxis).toBe(curve.ceilingPower)
      else expect(s.markLine?.data.some((d) => d.yAxis === curve.ceilingPower) ?? false).toBe(false)
    })
    expect(result.labCurves.some((c) => c.ceilingPower < 0.8)).toBe(true)
    // The target line rides on the first series.
    expect(option.series[0].markLine!.data.at(-1)!.yAxis).toBe(0.8)
    const byObs = labCurvesOption(result, 0.8, colors, 'obs', words) as {
      series: Series[]
      xAxis: { name: string }
    }
    expect(byObs.xAxis.name).toBe('observations per mouse')
    expect(byObs.series[0].data).toEqual(result.labCurves[0].byObs.map((p) => [p.obsPerUnit, p.power]))
  })
})

describe('planTableText', () => {
  it('adds the labs to each row of a plan over labs, and the totals count every lab', () => {
    const [header, ...rows] = planTableText(result, 2).split('\n')
    expect(header.split('\t').slice(0, 3)).toEqual(['labs', 'units per lab and arm', 'observations per unit'])
    const recommended = rows
      .find((r) => r.endsWith('yes'))!
      .split('\t')
      .map(Number)
    expect(recommended.slice(0, 3)).toEqual([result.labs, result.unitsPerArm, result.obsPerUnit])
    expect(recommended[3]).toBe(result.totalUnits)
    expect(recommended[4]).toBe(result.totalObs)
  })
})
