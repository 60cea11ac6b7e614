// @vitest-environment happy-dom
import { afterEach, describe, expect, it } from 'vitest'
import { AnalysisSettings } from '../../../shared/schemas/analyses'
import { AnalysisResult } from '../../../shared/schemas/analysis-result'
import { analyzeNested } from '../../../shared/analysis/analyze-nested'
import { buildChartData } from '../../../shared/analysis/chart-data'
import type { Factor, NestedColumns } from '../../../shared/stats/types'
import { mountResultBody } from '@/testing/mount-result-body'

/**
 * The result page on what the engine really returns for two factors and a covariate (not a
 * hand-made fixture): an invented table of 3 labs × 8 mice (each mouse one genotype × treatment
 * cell) × 5 neurons, with soma area per neuron.
 */

function factor(name: string, values: string[]): Factor {
  const labels = [...new Set(values)]
  return { name, labels, codes: Int32Array.from(values.map((v) => labels.indexOf(v))) }
}

function inventedTable(): NestedColumns {
  const lab: string[] = []
  const mouse: string[] = []
  const genotype: string[] = []
  const treatment: string[] = []
  const length: number[] = []
  const soma: number[] = []
  // A fixed, deterministic wobble instead of random numbers: the same table on every run.
  const wobble = (i: number) => Math.sin(i * 12.9898) * 0.5
  let row = 0
  for (const [l, labName] of ['nimbus', 'corvid', 'aster'].entries())
    for (let m = 0; m < 8; m++) {
      const g = m % 2
      const t = Math.floor(m / 2) % 2
      for (let n = 0; n < 5; n++, row++) {
        lab.push(labName)
        mouse.push(`m${m + 1}`)
        genotype.push(['WT', 'KO'][g])
        treatment.push(['vehicle', 'KX-9'][t])
        const area = 200 + 40 * wobble(row + 7)
        soma.push(area)
        length.push(
          120 + 4 * l - 10 * g + 8 * t + 9 * wobble(m + 3 * l) + 0.2 * (area - 200) + 12 * wobble(row),
        )
      }
    }
  return {
    responseName: 'neurite_length_um',
    response: Float64Array.from(length),
    levels: [factor('lab', lab), factor('mouse', mouse)],
    factors: [factor('genotype', genotype), factor('treatment', treatment)],
    covariates: [{ name: 'soma_area_um2', values: Float64Array.from(soma) }],
  }
}

const problems: string[] = []
afterEach(() => {
  document.body.innerHTML = ''
  problems.length = 0
})

describe('ResultBody on a real two-factor result', () => {
  it('shows the interaction chart, terms, simple effects and formula, without warnings', () => {
    const columns = inventedTable()
    // Parsed as the server stores it: the engine's document must pass the result schema.
    const result = AnalysisResult.parse(analyzeNested(columns))
    const chart = buildChartData(columns, result)
    const settings = AnalysisSettings.parse({
      response: 'neurite_length_um',
      conditions: ['genotype', 'treatment'],
      covariates: ['soma_area_um2'],
      levels: ['lab', 'mouse'],
    })
    const wrapper = mountResultBody(
      { version: { id: 1, settings, chart, result }, name: 'Invented', errorBar: 'sem' },
      problems,
    )
    expect(wrapper.get('[data-testid="interaction-section"]').text()).toContain('genotype and treatment')
    const terms = wrapper.findAll('[data-testid="terms-table"] tbody tr').map((tr) => tr.find('td').text())
    expect(terms).toEqual(
      expect.arrayContaining([
        'genotype',
        'treatment',
        'genotype × treatment (interaction)',
        'soma_area_um2',
      ]),
    )
    expect(wrapper.findAll('[data-testid="simple-effects-table"] tbody tr').length).toBeGreaterThan(0)
    expect(wrapper.get('[data-testid="model-formula"]').text()).toBe(result.model!.formula)
    expect(wrapper.get('[data-testid="badge-design-effect"]').text()).toContain(
      `for ${result.headline!.label}`,
    )
    expect(wrapper.get('[data-testid="report-methods"]').text()).toContain('design cells of “genotype”')
    expect(problems).toEqual([])
  })
})
