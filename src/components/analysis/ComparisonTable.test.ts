// @vitest-environment happy-dom
import { afterEach, describe, expect, it } from 'vitest'
import { mount } from '@vue/test-utils'
import type { AnalysisResult } from '../../../shared/schemas/analysis-result'
import demo from '../../../shared/report/fixtures/single-lab-demo.json'
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
})
