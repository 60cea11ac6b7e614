// @vitest-environment happy-dom
import { afterEach, describe, expect, it } from 'vitest'
import { mount } from '@vue/test-utils'
import { createMemoryHistory, createRouter } from 'vue-router'
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
    expect(units.text()).toContain('3–5 units per arm: a rough variance estimate')
    expect(units.attributes('data-adequacy')).toBe('thin')
    expect(wrapper.get('[data-testid="badge-observations"]').text()).toContain('412')
  })

  it('turns red with two units in an arm (common practice, no source)', () => {
    const thin = { ...result, groups: result.groups.map((g, i) => ({ ...g, nUnits: i ? 2 : 8 })) }
    const units = mountBadges(thin).get('[data-testid="badge-units-mouse"]')
    expect(units.attributes('data-adequacy')).toBe('too-few')
    expect(units.text()).toContain('too few to compare')
  })

  it('says what a green unit count means, that it is no power check, and links to the planner', () => {
    const many = { ...result, groups: result.groups.map((g) => ({ ...g, nUnits: 8 })) }
    stubMissingBrowserApis()
    const router = createRouter({
      history: createMemoryHistory(),
      routes: [{ path: '/planner', name: 'planner', component: { template: '<div />' } }],
    })
    const wrapper = mount(AnalysisBadges, {
      props: { result: many, planLink: { name: 'planner', query: { analysisId: '7', versionNo: '2' } } },
      global: { plugins: [createNestwiseVuetify(), router] },
      attachTo: document.body,
    })
    const units = wrapper.get('[data-testid="badge-units-mouse"]')
    expect(units.attributes('data-adequacy')).toBe('adequate')
    expect(wrapper.get('[data-testid="badge-units-mouse-words"]').text()).toBe(
      '6+ units per arm: the minimum for a usable variance estimate',
    )
    expect(units.text()).not.toContain('enough')
    expect(wrapper.get('[data-testid="badge-units-mouse-rule"]').text()).toContain('not a power check')
    expect(wrapper.get('[data-testid="badge-units-mouse-rule-why"]').attributes('aria-label')).toContain(
      'common practice, no source',
    )
    expect(wrapper.get('[data-testid="badge-units-mouse-plan"]').attributes('href')).toBe(
      '/planner?analysisId=7&versionNo=2',
    )
  })

  it('offers no planner link where none is given (paper, shared link)', () => {
    expect(mountBadges(result).find('[data-testid="badge-units-mouse-plan"]').exists()).toBe(false)
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
