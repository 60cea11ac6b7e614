// @vitest-environment happy-dom
import { flushPromises, type VueWrapper } from '@vue/test-utils'
import { afterEach, describe, expect, it, vi } from 'vitest'
import type { ExclusionCreate } from '../../../shared/schemas/datasets'
import { exclusion, neuriteColumns } from '@/testing/datasets'
import { mountWithVuetify } from '@/testing/mount-with-vuetify'
import ExclusionsPanel from './ExclusionsPanel.vue'

afterEach(() => {
  document.body.innerHTML = ''
})

function panel(overrides: Record<string, unknown> = {}) {
  const submit = vi.fn(async (_input: ExclusionCreate) => true)
  const wrapper = mountWithVuetify(ExclusionsPanel, {
    exclusions: [],
    columns: neuriteColumns,
    levels: ['lab', 'mouse'],
    rowCount: 72,
    excludedRowCount: 0,
    canEdit: true,
    submit,
    ...overrides,
  })
  return { wrapper, submit }
}

/** Sets a Vuetify select or combobox through its component, as a pick from the menu would. */
function field(wrapper: ReturnType<typeof mountWithVuetify>, testId: string): VueWrapper {
  return wrapper.findComponent(`[data-testid="${testId}"]`) as VueWrapper
}

function choose(wrapper: ReturnType<typeof mountWithVuetify>, testId: string, value: unknown) {
  field(wrapper, testId).vm.$emit('update:modelValue', value)
  return flushPromises()
}

describe('ExclusionsPanel', () => {
  it('will not leave rows out without a written reason', async () => {
    const { wrapper, submit } = panel()
    await choose(wrapper, 'exclusion-column', 'neurite_length_um')
    await wrapper.find('[data-testid="exclusion-value"] input').setValue('100')
    await wrapper.find('[data-testid="exclusion-add"]').trigger('click')
    expect(submit).not.toHaveBeenCalled()
    expect(wrapper.find('[data-testid="exclusion-reason"]').text()).toContain(
      'Write why these rows are left out.',
    )
  })

  it('sends a rule with its reason, then clears the value and reason', async () => {
    const { wrapper, submit } = panel()
    await choose(wrapper, 'exclusion-column', 'neurite_length_um')
    await choose(wrapper, 'exclusion-operator', 'ge')
    await wrapper.find('[data-testid="exclusion-value"] input').setValue('150')
    await wrapper
      .find('[data-testid="exclusion-reason"] textarea')
      .setValue('  Two crossing neurites traced as one  ')
    await wrapper.find('[data-testid="exclusion-add"]').trigger('click')
    await flushPromises()
    expect(submit).toHaveBeenCalledWith({
      kind: 'rule',
      rule: { column: 'neurite_length_um', operator: 'ge', value: '150' },
      reason: 'Two crossing neurites traced as one',
    })
    expect(
      (wrapper.find('[data-testid="exclusion-reason"] textarea').element as HTMLTextAreaElement).value,
    ).toBe('')
  })

  it('shows the rule in words before any column is chosen, never a raw code', async () => {
    const { wrapper } = panel()
    const select = field(wrapper, 'exclusion-operator')
    const { items, modelValue } = select.props() as { items: { value: string }[]; modelValue: string }
    expect(items.map((i) => i.value)).toContain(modelValue)
    expect(wrapper.find('[data-testid="exclusion-operator"]').text()).not.toMatch(/\bgt\b/)
  })

  it('offers only equality rules for text columns', async () => {
    const { wrapper } = panel()
    await choose(wrapper, 'exclusion-column', 'mouse')
    const { items } = field(wrapper, 'exclusion-operator').props() as { items: { value: string }[] }
    expect(items.map((i) => i.value)).toEqual(['eq', 'ne', 'missing'])
  })

  it('leaves out a whole unit by its full path', async () => {
    const { wrapper, submit } = panel()
    await wrapper.find('[data-testid="exclusion-mode-unit"]').trigger('click')
    await choose(wrapper, 'exclusion-unit-0', 'fernhill')
    await choose(wrapper, 'exclusion-unit-1', 'm3')
    await wrapper.find('[data-testid="exclusion-reason"] textarea').setValue('Culture contaminated')
    await wrapper.find('[data-testid="exclusion-add"]').trigger('click')
    await flushPromises()
    expect(submit).toHaveBeenCalledWith({
      kind: 'unit',
      unit: {
        path: [
          { column: 'lab', value: 'fernhill' },
          { column: 'mouse', value: 'm3' },
        ],
      },
      reason: 'Culture contaminated',
    })
  })

  it('lists exclusions in force with their reason as text, and withdrawn ones apart', async () => {
    const { wrapper } = panel({
      excludedRowCount: 4,
      exclusions: [
        exclusion({ reason: 'Looked <b>odd</b>' }),
        exclusion({
          id: 10,
          kind: 'unit',
          rule: null,
          unit: { path: [{ column: 'lab', value: 'nimbus' }] },
          removedAt: '2026-12-02T10:00:00.000Z',
          removedBy: { id: 2, name: 'Petra Nimbus' },
        }),
      ],
    })
    expect(wrapper.find('[data-testid="excluded-count"]').text()).toBe('4 rows')
    const active = wrapper.findAll('[data-testid="exclusion-item"]')
    expect(active).toHaveLength(1)
    expect(active[0].text()).toContain('“neurite_length_um” is greater than 100')
    expect(active[0].find('[data-testid="exclusion-reason-text"]').text()).toBe('Looked <b>odd</b>')
    expect(active[0].find('b').exists()).toBe(false)
    expect(wrapper.find('[data-testid="exclusions-withdrawn"]').text()).toContain(
      'counted in again by Petra Nimbus',
    )

    await active[0].find('[data-testid="exclusion-withdraw"]').trigger('click')
    expect(wrapper.emitted('withdraw')).toEqual([[9]])
  })

  it('shows no form and no withdraw button to readers', () => {
    const { wrapper } = panel({ canEdit: false, exclusions: [exclusion()] })
    expect(wrapper.find('[data-testid="exclusion-form"]').exists()).toBe(false)
    expect(wrapper.find('[data-testid="exclusion-withdraw"]').exists()).toBe(false)
  })
})
