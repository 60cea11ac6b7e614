// @vitest-environment happy-dom
import { afterEach, describe, expect, it } from 'vitest'
import { mount } from '@vue/test-utils'
import type { AnalysisResult } from '../../../shared/schemas/analysis-result'
import demo from '../../../shared/report/fixtures/single-lab-demo.json'
import { twoFactorResult } from '../../../shared/report/fixtures/two-factor-result'
import { createNestwiseVuetify } from '@/plugins/vuetify'
import { stubMissingBrowserApis } from '@/testing/mount-with-app'
import ComparisonTable from './ComparisonTable.vue'

// Fixture: the engine's stored result of the seeded single-lab demo.
const result = demo.result as AnalysisResult

afterEach(() => {
  document.body.innerHTML = ''
})

function mountTable(r: AnalysisResult) {
  stubMissingBrowserApis()
  return mount(ComparisonTable, { props: { result: r }, global: { plugins: [createNestwiseVuetify()] } })
}

describe('ComparisonTable', () => {
  it('strikes through only the naive row and explains why beside it', () => {
    const wrapper = mountTable(result)
    expect(wrapper.get('[data-testid="comparison-naive"]').classes()).toContain('row--wrong')
    expect(wrapper.get('[data-testid="comparison-unit-means"]').classes()).not.toContain('row--wrong')
    expect(wrapper.get('[data-testid="naive-reason"]').text()).toContain('Do not report this row.')
  })

  it('shows the model row with Satterthwaite df to one decimal and the p wording', () => {
    const row = mountTable(result).get('[data-testid="comparison-model-NW-117-vehicle"]')
    expect(row.text()).toContain('8.1')
    expect(row.text()).toContain('p = 0.56')
  })

  it('says there is nothing to compare without a condition', () => {
    const plain = {
      ...result,
      comparisons: { mixedModel: null, unitMeans: null, naive: null, bootstrap: null },
    }
    expect(mountTable(plain).text()).toContain('nothing to compare')
  })

  it('has no per-comparison design effect columns for an engine-0.1 result', () => {
    const headers = mountTable(result)
      .findAll('th')
      .map((th) => th.text())
    expect(headers).not.toContain('design effect')
  })

  it('adds each contrast’s design effect and effective n, and strikes the naive model through as a block', () => {
    // Invented two-factor fixture (shape only).
    const wrapper = mountTable(twoFactorResult)
    expect(wrapper.findAll('th').map((th) => th.text())).toEqual(
      expect.arrayContaining(['design effect', 'effective n']),
    )
    const row = wrapper.get('[data-testid="comparison-model-KO:KX-9-WT:vehicle"]')
    expect(row.text()).toContain('7.90')
    expect(row.text()).toContain('30.4')
    expect(wrapper.findAll('tr.row--wrong')).toHaveLength(4)
    const reasons = wrapper.findAll('[data-testid="naive-reason"]')
    expect(reasons).toHaveLength(1)
    expect(reasons[0].text()).toContain('Do not report these rows.')
    expect(reasons[0].attributes('colspan')).toBe('9')
  })
})
