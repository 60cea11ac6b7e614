// @vitest-environment happy-dom
import { afterEach, describe, expect, it } from 'vitest'
import { mount } from '@vue/test-utils'
import { computePlan } from '../../../shared/planning/compute-plan'
import { consortium } from '../../../shared/planning/fixtures/consortium'
import { PlanInputs, type PlanResult } from '../../../shared/schemas/plans'
import { createNestwiseVuetify } from '@/plugins/vuetify'
import { stubMissingBrowserApis } from '@/testing/mount-with-app'
import PlanResultPanel from './PlanResultPanel.vue'

afterEach(() => {
  document.body.innerHTML = ''
})

function mountPanel(result: PlanResult, extra: Record<string, unknown> = {}) {
  stubMissingBrowserApis()
  return mount(PlanResultPanel, {
    props: {
      result,
      targetPower: 0.8,
      arms: 2,
      unitWord: 'mouse',
      outerWord: 'lab',
      pilotUnits: null,
      ...extra,
    },
    // The charts draw on a canvas happy-dom does not have; their options are tested in plan-chart-options.test.ts.
    global: {
      plugins: [createNestwiseVuetify()],
      stubs: {
        PlanningChart: { props: ['testid'], template: '<figure :data-testid="testid"><slot /></figure>' },
      },
    },
    attachTo: document.body,
  })
}

describe('PlanResultPanel', () => {
  it('shows the labs, units per lab and arm, and the ceiling that more mice cannot beat', () => {
    const result = computePlan(PlanInputs.parse(consortium))
    const wrapper = mountPanel(result, { pilotLabs: 3 })
    expect(wrapper.get('[data-testid="plan-labs"]').text()).toBe(String(result.labs))
    expect(wrapper.get('[data-testid="plan-units"]').text()).toBe(String(result.unitsPerArm))
    expect(wrapper.text()).toContain('mice per lab and arm')
    expect(wrapper.get('[data-testid="plan-sentence"]').text()).toContain(`runs ${result.labs} labs with`)
    const below = result.labCurves.filter((c) => c.ceilingPower < 0.8).at(-1)!
    expect(wrapper.get('[data-testid="plan-ceiling"]').text()).toBe(
      `With ${below.labs} labs, no number of mice reaches more than ${Math.round(below.ceilingPower * 100)} % power: labs differ in how strongly they respond. It takes at least ${result.fewestLabs} labs to reach 80 %.`,
    )
    expect(wrapper.find('[data-testid="plan-effect-sd-unknown"]').exists()).toBe(false)
    expect(wrapper.find('[data-testid="plan-power-chart"]').exists()).toBe(false)
    expect(wrapper.find('[data-testid="plan-labs-chart"]').exists()).toBe(true)
    expect(wrapper.get('[data-testid="plan-cautions"]').text()).toContain('estimated from 3 labs')
    const header = wrapper.findAll('[data-testid="plan-table"] th').map((th) => th.text())
    expect(header.slice(0, 2)).toEqual(['labs', 'mice per lab and arm'])
  })

  it('warns, in words, when how much the effect differs between labs is unknown', () => {
    const result = computePlan(
      PlanInputs.parse({ ...consortium, outer: { ...consortium.outer, effectSd: null } }),
    )
    const warning = mountPanel(result).get('[data-testid="plan-effect-sd-unknown"]')
    expect(warning.text()).toContain('That is optimistic')
    expect(warning.text()).toContain('no number of mice can make up for it')
  })

  it('keeps the plan for one lab as it was: units per arm and the chart of observations per unit', () => {
    const result = computePlan(PlanInputs.parse({ ...consortium, outer: undefined }))
    const wrapper = mountPanel(result)
    expect(wrapper.find('[data-testid="plan-labs"]').exists()).toBe(false)
    expect(wrapper.find('[data-testid="plan-ceiling"]').exists()).toBe(false)
    expect(wrapper.find('[data-testid="plan-labs-chart"]').exists()).toBe(false)
    expect(wrapper.find('[data-testid="plan-power-chart"]').exists()).toBe(true)
    expect(wrapper.find('[data-testid="plan-obs-chart"]').exists()).toBe(true)
    expect(wrapper.text()).toContain('mice per arm')
    expect(wrapper.get('[data-testid="plan-sentence"]').text()).toMatch(/uses \d+ mice per arm/)
  })
})
