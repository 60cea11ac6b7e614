import { describe, expect, it } from 'vitest'
import type { AnalysisResult } from '../../../shared/schemas/analysis-result'
import demo from '../../../shared/report/fixtures/single-lab-demo.json'
import { twoFactorResult } from '../../../shared/report/fixtures/two-factor-result'
import { interactionChartOption, interactionLayout } from './interaction-chart-option'

const colors = {
  text: '#000',
  muted: '#777',
  grid: '#ccc',
  naive: '#555',
  nested: '#06c',
  background: '#fff',
}

type Series = { type: string; name: string; data: number[][] }

describe('interaction chart', () => {
  // Invented two-factor fixture: x = genotype (WT, KO), one line per treatment (vehicle, KX-9).
  const layout = interactionLayout(twoFactorResult)!

  it('places each design cell at its first-factor level, on its second-factor line', () => {
    expect(layout.xLevels).toEqual(['WT', 'KO'])
    expect(layout.lineLevels).toEqual(['vehicle', 'KX-9'])
    const at = (x: number, line: number) => layout.points.find((p) => p.x === x && p.line === line)!.group
    expect(at(1, 1).condition).toBe('KO:KX-9')
    expect(at(0, 0).condition).toBe('WT:vehicle')
  })

  it('draws one line and one set of nested 95% intervals per level of the second factor', () => {
    const option = interactionChartOption(layout, 'neurite_length_um', colors) as { series: Series[] }
    const lines = option.series.filter((s) => s.type === 'line')
    const bars = option.series.filter((s) => s.type === 'custom')
    expect(lines.map((s) => s.name)).toEqual(['treatment = vehicle', 'treatment = KX-9'])
    expect(bars.map((s) => s.name)).toEqual(lines.map((s) => s.name))
    // The y of each point is the cell's model mean; its interval the clustered (nested) CI.
    const wtVehicle = twoFactorResult.groups[0].clustered
    expect(lines[0].data[0][1]).toBe(wtVehicle.estimate)
    expect(bars[0].data[0].slice(1, 3)).toEqual([wtVehicle.ciLow, wtVehicle.ciHigh])
    // Lines are set side by side so intervals do not hide each other.
    expect(lines[0].data[0][0]).toBeLessThan(0)
    expect(lines[1].data[0][0]).toBeGreaterThan(0)
  })

  it('is absent for one factor, and for results of engine 0.1', () => {
    expect(interactionLayout(demo.result as AnalysisResult)).toBeNull()
    const noLevels = {
      ...twoFactorResult,
      groups: twoFactorResult.groups.map(({ factorLevels: _f, ...g }) => g),
    }
    expect(interactionLayout(noLevels)).toBeNull()
  })
})
