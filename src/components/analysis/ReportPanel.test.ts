// @vitest-environment happy-dom
import { afterEach, describe, expect, it, vi } from 'vitest'
import { flushPromises, mount } from '@vue/test-utils'
import { AnalysisSettings } from '../../../shared/schemas/analyses'
import type { AnalysisResult } from '../../../shared/schemas/analysis-result'
import demo from '../../../shared/report/fixtures/single-lab-demo.json'
import { createNestwiseVuetify } from '@/plugins/vuetify'
import { stubMissingBrowserApis } from '@/testing/mount-with-app'
import ReportPanel from './ReportPanel.vue'

// Fixture: the engine's stored result of the seeded single-lab demo.
const props = { result: demo.result as AnalysisResult, settings: AnalysisSettings.parse(demo.settings) }

afterEach(() => {
  vi.unstubAllGlobals()
  document.body.innerHTML = ''
})

describe('ReportPanel', () => {
  it('copies the methods paragraph as shown', async () => {
    stubMissingBrowserApis()
    const writeText = vi.fn().mockResolvedValue(undefined)
    Object.defineProperty(navigator, 'clipboard', { value: { writeText }, configurable: true })
    const wrapper = mount(ReportPanel, { props, global: { plugins: [createNestwiseVuetify()] } })
    const shown = wrapper.get('[data-testid="report-methods"]').text()
    expect(shown).toContain('Nestwise (statistics engine 0.1.0)')
    await wrapper.get('[data-testid="copy-methods"]').trigger('click')
    await flushPromises()
    expect(writeText).toHaveBeenCalledWith(shown)
    expect(wrapper.get('[data-testid="copy-methods"]').text()).toContain('Copied')
  })
})
