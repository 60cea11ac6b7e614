// @vitest-environment happy-dom
import { afterEach, describe, expect, it } from 'vitest'
import { mount } from '@vue/test-utils'
import { nextTick, ref } from 'vue'
import { PlanInputs, type PlanInputsInput } from '../../../shared/schemas/plans'
import { createNestwiseVuetify } from '@/plugins/vuetify'
import { stubMissingBrowserApis } from '@/testing/mount-with-app'
import PlanInputsForm from './PlanInputsForm.vue'

afterEach(() => {
  document.body.innerHTML = ''
})

/** A plan for one lab, as a plan saved before the outer level existed (no `outer`). */
const oneLab: PlanInputsInput = {
  icc: 0.2,
  spread: { kind: 'total', sdTotal: 25 },
  difference: 10,
  costPerUnit: 100,
  costPerObs: 1,
}

function mountForm(start: PlanInputsInput) {
  stubMissingBrowserApis()
  const model = ref<PlanInputsInput>(start)
  const wrapper = mount(PlanInputsForm, {
    props: {
      modelValue: model.value,
      'onUpdate:modelValue': (value: PlanInputsInput) => {
        model.value = value
        void wrapper.setProps({ modelValue: value })
      },
      unitWord: 'mouse',
      responseName: 'neurite length',
    },
    global: { plugins: [createNestwiseVuetify()] },
    attachTo: document.body,
  })
  return { wrapper, model }
}

const field = (wrapper: ReturnType<typeof mountForm>['wrapper'], testid: string) =>
  wrapper.get(`[data-testid="${testid}"] input`)

describe('PlanInputsForm', () => {
  it('asks for the outer level, and for the effect SD between labs only once there is more than one lab', async () => {
    const { wrapper, model } = mountForm(oneLab)
    expect(field(wrapper, 'input-outer-name').element).toHaveProperty('value', 'lab')
    expect(wrapper.find('[data-testid="input-effect-sd"]').exists()).toBe(false)
    await field(wrapper, 'input-labs-max').setValue('8')
    await field(wrapper, 'input-labs-min').setValue('3')
    await field(wrapper, 'input-cost-lab').setValue('1500')
    await nextTick()
    expect(model.value.outer).toMatchObject({ minLabs: 3, maxLabs: 8, costPerLab: 1500, effectSd: null })
    expect(wrapper.text()).toContain('How the neurite length varies inside a lab and arm')
    expect(wrapper.get('[data-testid="input-effect-sd"]').text()).toContain('SD of the effect between labs')
    await field(wrapper, 'input-effect-sd').setValue('2,5')
    expect(model.value.outer?.effectSd).toBe(2.5)
    // Cleared again: unknown.
    await field(wrapper, 'input-effect-sd').setValue('')
    expect(model.value.outer?.effectSd).toBeNull()
    // The result is a valid plan input with the outer level (common practice, no source).
    expect(PlanInputs.parse(model.value).outer).toMatchObject({ name: 'lab', minLabs: 3, maxLabs: 8 })
  })

  it('uses the outer level’s own name, and asks for the SD between labs when each runs one arm', async () => {
    const { wrapper, model } = mountForm({ ...oneLab, outer: { name: 'plate', minLabs: 3, maxLabs: 3 } })
    expect(wrapper.get('[data-testid="input-labs-min"]').text()).toContain('plates from')
    expect(wrapper.get('[data-testid="input-cost-lab"]').text()).toContain('cost / plate')
    expect(wrapper.get('[data-testid="input-max-units"]').text()).toContain('max mice / plate and arm')
    await wrapper.get('[data-testid="design-one-arm"] input').setValue(true)
    await nextTick()
    expect(model.value.outer?.design).toBe('one-arm')
    expect(wrapper.find('[data-testid="input-effect-sd"]').exists()).toBe(false)
    await field(wrapper, 'input-sd-labs').setValue('4')
    expect(model.value.outer?.sdBetweenLabs).toBe(4)
    await field(wrapper, 'input-outer-name').setValue('day')
    expect(model.value.outer?.name).toBe('day')
    expect(wrapper.get('[data-testid="input-labs-min"]').text()).toContain('days from')
  })
})
