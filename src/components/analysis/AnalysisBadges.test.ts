// @vitest-environment happy-dom
import { afterEach, describe, expect, it } from 'vitest'
import { mount } from '@vue/test-utils'
import type { AnalysisResult } from '../../../shared/schemas/analysis-result'
import demo from '../../../shared/report/fixtures/single-lab-demo.json'
import { createNestwiseVuetify } from '@/plugins/vuetify'
import { stubMissingBrowserApis } from '@/testing/mount-with-app'
import AnalysisBadges from './AnalysisBadges.vue'

// Fixture: the engine's stored result of the seeded single-lab demo (5 mice per arm).
const result = demo.result as AnalysisResult

afterEach(() => {
  document.body.innerHTML = ''
})

function mountBadges(r: AnalysisResult) {
  stubMissingBrowserApis()
  return mount(AnalysisBadges, {
    props: { result: r },
    global: { plugins: [createNestwiseVuetify()] },
    attachTo: document.body,
  })
}

describe('AnalysisBadges', () => {
  it('always shows the number and words, not colour alone', () => {
    const wrapper = mountBadges(result)
    const units = wrapper.get('[data-testid="badge-units-mouse"]')
    expect(units.text()).toContain('10')
    expect(units.text()).toContain('few')
    expect(units.attributes('data-adequacy')).toBe('thin')
    expect(wrapper.get('[data-testid="badge-observations"]').text()).toContain('412')
  })

  it('turns red with two units in an arm (common practice, no source)', () => {
    const thin = { ...result, groups: result.groups.map((g, i) => ({ ...g, nUnits: i ? 2 : 8 })) }
    const units = mountBadges(thin).get('[data-testid="badge-units-mouse"]')
    expect(units.attributes('data-adequacy')).toBe('too-few')
    expect(units.text()).toContain('too few to compare')
  })

  it('labels per-arm effective n as each arm’s mean, with a hover saying why they do not add up', () => {
    const wrapper = mountBadges(result)
    const perArm = wrapper.get('[data-testid="badge-effective-n-per-arm"]')
    expect(perArm.text()).toContain('for each arm’s mean: 12.1 vehicle · 11.4 NW-117')
    const why = wrapper.get('[data-testid="badge-effective-n-per-arm-why"]')
    expect(why.attributes('aria-label')).toContain('do not add up')
    expect(why.attributes('tabindex')).toBe('0')
  })
})
