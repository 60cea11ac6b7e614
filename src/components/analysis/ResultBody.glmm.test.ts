// @vitest-environment happy-dom
import { afterEach, describe, expect, it } from 'vitest'
import { AnalysisSettings } from '../../../shared/schemas/analyses'
import { AnalysisResult } from '../../../shared/schemas/analysis-result'
import { analyzeNested } from '../../../shared/analysis/analyze-nested'
import { buildChartData } from '../../../shared/analysis/chart-data'
import { inventedNeuronTable } from '../../../shared/analysis/fixtures/invented-glmm-tables'
import { nestedColumnsFromTable } from '../../../shared/stats/fixtures/nested-columns-from-table'
import { mountResultBody } from '@/testing/mount-result-body'

/**
 * The result page on what the engine really returns for a yes/no and a count response: an
 * invented table of neurons in mice in three fictional labs (shared/analysis/fixtures).
 */

const problems: string[] = []
afterEach(() => {
  document.body.innerHTML = ''
  problems.length = 0
})

function mountResult(family: 'binomial' | 'poisson') {
  const table = inventedNeuronTable()
  const columns =
    family === 'binomial'
      ? { ...nestedColumnsFromTable(table, 'marker01', ['lab', 'mouse'], 'treatment'), family }
      : { ...nestedColumnsFromTable(table, 'puncta', ['lab', 'mouse', 'neuron'], 'treatment'), family }
  const engine = analyzeNested(columns, { reference: { treatment: 'vehicle' } })
  if (family === 'binomial') engine.outcome = { positive: 'positive', negative: 'negative' }
  // Parsed as the server stores it: the engine's document must pass the result schema.
  const result = AnalysisResult.parse(engine)
  const chart = buildChartData(columns, result)
  const settings = AnalysisSettings.parse({
    response: columns.responseName,
    conditions: ['treatment'],
    levels: columns.levels.map((l) => l.name),
    family,
    positive: family === 'binomial' ? 'positive' : null,
  })
  const wrapper = mountResultBody(
    { version: { id: 1, settings, chart, result }, name: 'Invented', errorBar: 'sem' },
    problems,
  )
  return { wrapper, result }
}

describe('ResultBody on a real yes/no result', () => {
  it('gives the odds ratio, z tests, a χ² term test and says the variance is on the latent scale', () => {
    const { wrapper, result } = mountResult('binomial')
    const contrast = result.comparisons.mixedModel!.contrasts[0]
    expect('ratio' in contrast).toBe(true)
    const row = wrapper.get('[data-testid="comparison-model-QZ-41-vehicle"]').text()
    expect(row).toContain('QZ-41 vs vehicle')
    expect(row).toMatch(/OR \d\.\d\d/)
    expect(wrapper.get('[data-testid="ratio-note"]').text()).toContain('odds ratio (OR)')
    const headers = wrapper.findAll('[data-testid="coefficients-table"] th').map((th) => th.text())
    expect(headers).toContain('z')
    expect(headers).not.toContain('df')
    expect(headers).toContain('odds ratio [95% CI]')
    expect(wrapper.get('[data-testid="latent-scale-note"]').text()).toContain('latent (log-odds) scale')
    expect(wrapper.get('[data-testid="main-chart-scale"]').text()).toContain(
      '95% intervals on the proportion scale',
    )
    expect(wrapper.get('[data-testid="main-chart-key-glmm"]').text()).toContain('typical unit')
    expect(wrapper.find('[data-testid="error-bar-toggle"]').exists()).toBe(false)
    expect(wrapper.get('[data-testid="model-family"]').text()).toContain('binomial(link = "logit")')
    expect(wrapper.get('[data-testid="model-reading"]').text()).toContain('the log odds of yes (“positive”)')
    expect(wrapper.get('[data-testid="badge-design-effect"]').text()).toContain('(its log odds ratio)')
    expect(wrapper.get('[data-testid="report-results"]').text()).toContain('odds ratio')
    const caution = wrapper.get('[data-testid="model-caution"]').text()
    expect(caution).toContain('roughly normal on the log odds scale')
    expect(caution).not.toMatch(/counts or proportions/)
    expect(problems).toEqual([])
  })
})

describe('ResultBody on a real count result', () => {
  it('gives rate ratios and the log link’s latent residual', () => {
    const { wrapper } = mountResult('poisson')
    expect(wrapper.get('[data-testid="comparison-model-QZ-41-vehicle"]').text()).toMatch(/RR \d\.\d\d/)
    expect(wrapper.get('[data-testid="latent-scale-note"]').text()).toContain('ln(1 + 1/λ)')
    expect(wrapper.get('[data-testid="report-methods"]').text()).toContain('Poisson mixed model (log link)')
    expect(wrapper.get('[data-testid="model-caution"]').text()).toContain(
      'roughly normal on the log rate scale, and the counts no more spread than the model allows',
    )
    expect(problems).toEqual([])
  })
})
