// @vitest-environment happy-dom
import { afterEach, describe, expect, it } from 'vitest'
import { AnalysisSettings, type ChartData } from '../../../shared/schemas/analyses'
import { AnalysisResult } from '../../../shared/schemas/analysis-result'
import demo from '../../../shared/report/fixtures/single-lab-demo.json'
import { twoFactorResult } from '../../../shared/report/fixtures/two-factor-result'
import { mountResultBody } from '@/testing/mount-result-body'

// Fixtures: the stored result of the seeded single-lab demo as engine 0.1.0 wrote it (no field of
// engine 0.2), read through today's schema like the server reads it; and the invented two-factor
// result. The chart data are invented (shape only): the chart itself is stubbed, happy-dom draws no canvas.
const oldResult = AnalysisResult.parse(demo.result)
const oldSettings = AnalysisSettings.parse(demo.settings)

function chartFor(conditions: string[]): ChartData {
  return {
    response: 'neurite_length_um',
    condition: 'treatment',
    conditionLevel: 'mouse',
    conditions: conditions.map((condition) => ({
      condition,
      nObs: 10,
      naive: { estimate: 10, se: 0.6, df: 9, ci: [8.6, 11.4], sd: 2 },
      nested: { estimate: 10, se: 1.5, df: 2, ci: [5, 15], sd: 1.4, nUnits: 2 },
    })),
    unitLevels: [{ level: 'mouse', roles: ['condition-level', 'innermost'], units: [] }],
    points: { level: 'mouse', limit: 5000, nTotal: 0, nShown: 0, seed: 's', y: [], cell: [] },
    variance: { components: oldResult.varianceComponents, icc: oldResult.icc },
  }
}

const problems: string[] = []
afterEach(() => {
  document.body.innerHTML = ''
  problems.length = 0
})

function mountBody(result: AnalysisResult) {
  // Any Vue warning or render error fails the test: "renders without errors" means none.
  return mountResultBody(
    {
      version: {
        id: 1,
        settings: oldSettings,
        chart: chartFor(result.groups.map((g) => g.condition)),
        result,
      },
      name: 'Test analysis',
      errorBar: 'sem',
    },
    problems,
  )
}

describe('ResultBody', () => {
  it('renders a stored engine-0.1.0 result without errors, hiding every section it has no field for', () => {
    expect(oldResult.engine.version).toBe('0.1.0')
    expect(oldResult.model).toBeUndefined()
    const wrapper = mountBody(oldResult)
    for (const present of [
      'result-badges',
      'main-chart-panel',
      'comparison-table',
      'warnings',
      'variance-panel',
    ])
      expect(wrapper.find(`[data-testid="${present}"]`).exists(), present).toBe(true)
    for (const absent of ['interaction-section', 'fixed-effects', 'effect-variation', 'model-panel'])
      expect(wrapper.find(`[data-testid="${absent}"]`).exists(), absent).toBe(false)
    expect(wrapper.get('[data-testid="report-results"]').text()).toContain('NW-117 minus vehicle: 7.62')
    expect(wrapper.get('[data-testid="badge-design-effect"]').text()).toContain(
      'for the mean of all observations',
    )
  })

  it('shows the interaction chart, the terms, the formula and the effect variation of a two-factor result', () => {
    const wrapper = mountBody(twoFactorResult)
    expect(wrapper.find('[data-testid="interaction-section"]').text()).toContain(
      'How genotype and treatment combine',
    )
    expect(wrapper.findAll('[data-testid="terms-table"] tbody tr')).toHaveLength(4)
    expect(wrapper.find('[data-testid="simple-effects-table"]').exists()).toBe(true)
    expect(wrapper.find('[data-testid="coefficients-table"]').text()).toContain('per 1 µm² of soma_area_um2')
    expect(wrapper.get('[data-testid="model-formula"]').text()).toBe(twoFactorResult.model!.formula)
    expect(wrapper.get('[data-testid="model-reading"]').text()).toMatch(/^In words: /)
    expect(wrapper.get('[data-testid="effect-variation-lab:treatment"]').text()).toContain(
      'The effect of treatment differs between labs by about 9.80 µm (SD).',
    )
    // Three labs: our caution says so, since the fixture's engine warning does not name the term.
    expect(wrapper.findAll('[data-testid="effect-variation-caution"]')).toHaveLength(2)
    expect(wrapper.get('[data-testid="badge-effective-n"]').text()).toContain('for KO − WT')
    expect(wrapper.get('[data-testid="model-caution"]').text()).toMatch(
      /roughly alike across conditions\. .* consult a statistician\.$/,
    )
    expect(problems).toEqual([])
  })

  it('shows an engine warning about a level × condition term beside it, and not again in the list', () => {
    const warning = {
      code: 'LEVEL_EFFECT_FEW_UNITS',
      message: 'The lab:treatment variance rests on 3 labs.',
    }
    const wrapper = mountBody({ ...twoFactorResult, warnings: [...twoFactorResult.warnings, warning] })
    const beside = wrapper.get('[data-testid="effect-variation-lab:treatment"]')
    expect(beside.find('[data-warning="LEVEL_EFFECT_FEW_UNITS"]').exists()).toBe(true)
    expect(beside.find('[data-testid="effect-variation-caution"]').exists()).toBe(false)
    const list = wrapper.get('[data-testid="warnings"]')
    expect(list.find('[data-warning="LEVEL_EFFECT_FEW_UNITS"]').exists()).toBe(false)
    expect(list.get('[data-testid="warnings-placed-elsewhere"]').text()).toContain('One more caution')
  })
})
