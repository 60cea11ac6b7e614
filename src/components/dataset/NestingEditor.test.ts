// @vitest-environment happy-dom
import { afterEach, describe, expect, it } from 'vitest'
import { flushPromises, type VueWrapper } from '@vue/test-utils'
import type { ColumnProfile } from '../../../shared/schemas/datasets'
import { ApiError } from '@/api/http'
import { neuriteColumns, neuriteDesign, neuriteSuggestion, tagging } from '@/testing/datasets'
import { mountWithVuetify } from '@/testing/mount-with-vuetify'
import NestingEditor from './NestingEditor.vue'

afterEach(() => {
  document.body.innerHTML = ''
})

const base = {
  columns: neuriteColumns,
  suggestion: neuriteSuggestion,
  tagging: null,
  design: null,
  canEdit: true,
}

const levelsOf = (wrapper: ReturnType<typeof mountWithVuetify>) =>
  wrapper.findAll('[data-testid="nesting-level"]').map((row) => row.attributes('data-level'))

describe('NestingEditor', () => {
  it('explains the suggestion: levels with unit counts, reused labels and where the condition varies', () => {
    const wrapper = mountWithVuetify(NestingEditor, base)
    const card = wrapper.find('[data-testid="nesting-suggestion"]')
    const chain = card.findAll('[data-testid="chain-level"]').map((l) => l.text())
    expect(chain[0]).toContain('lab')
    expect(chain[0]).toContain('3 units')
    expect(chain[1]).toContain('12 units · 4 per “lab”')
    expect(card.find('[data-testid="suggestion-reused"]').text()).toContain('m1, m2, m3, m4')
    expect(card.find('[data-testid="suggestion-placement"]').text()).toBe(
      'varies between “mouse” units, within “lab”',
    )
    expect(card.findAll('[data-testid="suggestion-explanation"] li')).toHaveLength(2)
  })

  it('takes over the suggestion with one click and saves it', async () => {
    const wrapper = mountWithVuetify(NestingEditor, base)
    expect(wrapper.find('[data-testid="nesting-save"]').attributes('disabled')).toBeDefined()

    await wrapper.find('[data-testid="use-suggestion"]').trigger('click')
    expect(levelsOf(wrapper)).toEqual(['lab', 'mouse'])
    expect(wrapper.find('[data-testid="use-suggestion"]').text()).toBe('Suggestion in use')

    await wrapper.find('[data-testid="nesting-save"]').trigger('click')
    expect(wrapper.emitted('save')).toEqual([
      [{ responseColumns: ['neurite_length_um'], conditionColumn: 'condition', levels: ['lab', 'mouse'] }],
    ])
  })

  it('reorders and removes levels with the buttons, and saves the new order', async () => {
    const wrapper = mountWithVuetify(NestingEditor, { ...base, tagging: tagging(), design: neuriteDesign })
    expect(levelsOf(wrapper)).toEqual(['lab', 'mouse'])
    expect(wrapper.find('[data-testid="nesting-save"]').attributes('disabled')).toBeDefined()

    await wrapper.findAll('[data-testid="level-down"]')[0].trigger('click')
    expect(levelsOf(wrapper)).toEqual(['mouse', 'lab'])
    await wrapper.findAll('[data-testid="level-up"]')[1].trigger('click')
    expect(levelsOf(wrapper)).toEqual(['lab', 'mouse'])
    await wrapper.findAll('[data-testid="level-remove"]')[0].trigger('click')
    expect(levelsOf(wrapper)).toEqual(['mouse'])

    await wrapper.find('[data-testid="nesting-save"]').trigger('click')
    expect(wrapper.emitted('save')?.[0]).toEqual([
      { responseColumns: ['neurite_length_um'], conditionColumn: 'condition', levels: ['mouse'] },
    ])
  })

  it('moves a level by dragging it onto another', async () => {
    const wrapper = mountWithVuetify(NestingEditor, { ...base, tagging: tagging(), design: neuriteDesign })
    const rows = wrapper.findAll('[data-testid="nesting-level"]')
    await rows[1].trigger('dragstart', { dataTransfer: { setData: () => {}, effectAllowed: '' } })
    await rows[0].trigger('drop')
    expect(levelsOf(wrapper)).toEqual(['mouse', 'lab'])
  })

  it('shows the saved design with units per condition, coloured by adequacy and always with the number', () => {
    const wrapper = mountWithVuetify(NestingEditor, { ...base, tagging: tagging(), design: neuriteDesign })
    const arms = wrapper.findAll('[data-testid="design-arm"]')
    expect(arms.map((a) => a.find('td').text())).toEqual(['vehicle', 'NW-117'])
    const badges = wrapper.findAll('[data-testid="unit-count-badge"]')
    expect(badges.map((b) => b.attributes('data-adequacy'))).toEqual(['adequate', 'too-few'])
    expect(badges.map((b) => b.text())).toEqual(['6 units · 6+ per arm', '2 units · too few to compare'])
    expect(wrapper.find('[data-testid="design-placement"]').text()).toContain('between “mouse” units')
  })

  it('offers a two-valued text column as a yes/no response and says which value counts as yes', async () => {
    const marker: ColumnProfile = {
      ...neuriteColumns[2],
      position: 6,
      name: 'outcome',
      topValues: [
        { value: 'unbranched', count: 40 },
        { value: 'branched', count: 32 },
      ],
    }
    const wrapper = mountWithVuetify(NestingEditor, { ...base, columns: [...neuriteColumns, marker] })
    const select = wrapper.findComponent('[data-testid="nesting-response"]') as VueWrapper
    const items = (select.props() as { items: { value: string; props: { subtitle: string } }[] }).items
    const hint = 'two values: analysed as yes/no (counted as yes: unbranched)'
    expect(items.find((i) => i.value === 'outcome')?.props.subtitle).toBe(`Text · ${hint}`)
    // Numbers first, then the two-valued text columns (the condition could be one too), then other text.
    expect(items.map((i) => i.value)).toEqual([
      'neuron',
      'neurite_length_um',
      'condition',
      'outcome',
      'lab',
      'mouse',
    ])
    expect(wrapper.find('[data-testid="nesting-form"]').text()).not.toContain('analysed as yes/no')

    select.vm.$emit('update:modelValue', ['outcome'])
    await flushPromises()
    expect(wrapper.find('[data-testid="nesting-form"]').text()).toContain(`outcome: ${hint}`)
  })

  it('shows the reason the server refused a nesting', () => {
    const error = new ApiError({
      status: 422,
      code: 'UNPROCESSABLE',
      message: '“NW-117” has only one “mouse” unit in the rows kept.',
    })
    const wrapper = mountWithVuetify(NestingEditor, { ...base, error })
    expect(wrapper.find('[data-testid="error-notice"]').text()).toContain('has only one “mouse” unit')
  })

  it('is read-only for people who may not change it', () => {
    const wrapper = mountWithVuetify(NestingEditor, {
      ...base,
      canEdit: false,
      tagging: tagging(),
      design: neuriteDesign,
    })
    expect(wrapper.find('[data-testid="nesting-save"]').exists()).toBe(false)
    expect(wrapper.find('[data-testid="use-suggestion"]').exists()).toBe(false)
    expect(wrapper.find('[data-testid="level-up"]').exists()).toBe(false)
    expect(wrapper.find('[data-testid="nesting-form"]').text()).toContain(
      'Scientists and PIs of the lab set the nesting',
    )
  })

  it('says each fact about the saved nesting once on the tab, also while the form is being changed', async () => {
    // Saved as suggested; the server's summary repeats the suggestion's sentence on units per level.
    const units = '“mouse” has 12 units, 4 in each “lab”.'
    const design = { ...neuriteDesign, explanation: ['“lab” has 3 units.', units] }
    const wrapper = mountWithVuetify(NestingEditor, { ...base, tagging: tagging(), design })
    const bullets = () => wrapper.findAll('li').map((li) => li.text())
    const chains = () => wrapper.findAll('[data-testid="chain-level"]')
    expect(bullets().filter((text) => text === units)).toHaveLength(1)
    expect(chains()).toHaveLength(2)

    // A change in the form, not saved: the suggestion is still what the summary below describes.
    await wrapper.findAll('[data-testid="level-remove"]')[0].trigger('click')
    expect(wrapper.find('[data-testid="nesting-form"]').text()).toContain('Changed, not saved.')
    expect(bullets().filter((text) => text === units)).toHaveLength(1)
    expect(chains()).toHaveLength(2)
    expect(wrapper.findAll('[data-testid$="-placement"]')).toHaveLength(1)
    expect(wrapper.find('[data-testid="suggestion-compact"]').exists()).toBe(true)
    // Taking the suggestion over again still works from the short card.
    await wrapper.get('[data-testid="use-suggestion"]').trigger('click')
    expect(levelsOf(wrapper)).toEqual(['lab', 'mouse'])
  })

  it('explains the suggestion in full when the saved nesting is a different one', () => {
    const wrapper = mountWithVuetify(NestingEditor, {
      ...base,
      tagging: tagging({ levels: ['mouse'] }),
      design: neuriteDesign,
    })
    expect(wrapper.find('[data-testid="suggestion-compact"]').exists()).toBe(false)
    expect(wrapper.findAll('[data-testid="suggestion-explanation"] li')).toHaveLength(2)
  })
})
