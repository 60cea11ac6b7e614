// @vitest-environment happy-dom
import { afterEach, describe, expect, it } from 'vitest'
import { mount } from '@vue/test-utils'
import { nextTick, ref } from 'vue'
import { PlanInputs, type PlanDraftInput } from '../../../shared/schemas/plans'
import { createNestwiseVuetify } from '@/plugins/vuetify'
import { stubMissingBrowserApis } from '@/testing/mount-with-app'
import PlanInputsForm from './PlanInputsForm.vue'

afterEach(() => {
  document.body.innerHTML = ''
})

/** A plan for one lab, as a plan saved before the outer level existed (no `outer`). */
const oneLab: PlanDraftInput = {
  icc: 0.2,
  spread: { kind: 'total', sdTotal: 25 },
  difference: 10,
  costPerUnit: 100,
  costPerObs: 1,
}

function mountForm(start: PlanDraftInput, observed: Record<string, unknown> | null = null) {
  stubMissingBrowserApis()
  const model = ref<PlanDraftInput>(start)
  const wrapper = mount(PlanInputsForm, {
    props: {
      modelValue: model.value,
      'onUpdate:modelValue': (value: PlanDraftInput) => {
        model.value = value
        void wrapper.setProps({ modelValue: value })
      },
      unitWord: 'mouse',
      responseName: 'neurite length',
      observed: observed as never,
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

  it('asks for the difference that matters, with the observed one beside it as a reference only', async () => {
    const { wrapper, model } = mountForm(
      { ...oneLab, difference: null, costPerUnit: null, costPerObs: null },
      { what: 'NW-117 − vehicle', estimate: 7.6194, ci: [-21.08, 36.32], p: 0.5577 },
    )
    const difference = wrapper.get('[data-testid="input-difference"]')
    expect(difference.text()).toContain('Difference that matters biologically')
    expect(field(wrapper, 'input-difference').element).toHaveProperty('value', '')
    expect(wrapper.get('[data-testid="observed-reference"]').text()).toBe(
      'For reference, observed: NW-117 − vehicle: 7.62, 95 % interval [-21.1, 36.3], p = 0.56',
    )
    expect(wrapper.get('[data-testid="observed-why"]').text()).toContain(
      'Why not plan on the observed difference?',
    )
    await field(wrapper, 'input-difference').setValue('12')
    expect(model.value.difference).toBe(12)
    await field(wrapper, 'input-difference').setValue('')
    expect(model.value.difference).toBeNull()
  })

  it('leaves the costs empty and says the plan then counts units; a cost typed and cleared is empty again', async () => {
    const { wrapper, model } = mountForm({ ...oneLab, costPerUnit: null, costPerObs: null })
    expect(wrapper.get('[data-testid="costs-hint"]').text()).toMatch(
      /^No costs: the plan keeps the number of mice/,
    )
    expect(field(wrapper, 'input-cost-unit').element).toHaveProperty('value', '')
    // One lab: no cost per lab to give.
    expect(wrapper.find('[data-testid="input-cost-lab"]').exists()).toBe(false)
    await field(wrapper, 'input-cost-unit').setValue('400')
    expect(model.value.costPerUnit).toBe(400)
    expect(wrapper.get('[data-testid="costs-hint"]').text()).toMatch(/empty them all to count instead/)
    await field(wrapper, 'input-cost-unit').setValue('')
    expect(model.value.costPerUnit).toBeNull()
    expect(PlanInputs.safeParse(model.value).success).toBe(true)
  })
})
