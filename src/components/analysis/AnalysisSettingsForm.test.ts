// @vitest-environment happy-dom
import { afterEach, describe, expect, it } from 'vitest'
import { nextTick } from 'vue'
import { mount } from '@vue/test-utils'
import { createNestwiseVuetify } from '@/plugins/vuetify'
import { stubMissingBrowserApis } from '@/testing/mount-with-app'
import AnalysisSettingsForm from './AnalysisSettingsForm.vue'
import { draftFrom, type FormDefaults, type SettingsDraft } from './settings-form'

// An invented table: genotype's labels are known, dose (a numeric column used as a factor) has none.
const defaults: FormDefaults = {
  columns: ['length', 'soma_area', 'genotype', 'dose', 'lab', 'mouse'],
  numericColumns: ['length', 'soma_area', 'dose'],
  labelsByColumn: { genotype: ['WT', 'KO'] },
}

afterEach(() => {
  document.body.innerHTML = ''
})

function mountForm(draft: SettingsDraft, problems: Record<string, string> = {}) {
  stubMissingBrowserApis()
  return mount(AnalysisSettingsForm, {
    props: {
      modelValue: draft,
      defaults,
      problems,
      'onUpdate:modelValue': () => undefined,
    },
    global: { plugins: [createNestwiseVuetify()] },
    attachTo: document.body,
  })
}

const twoFactors = (): SettingsDraft => ({
  ...draftFrom(null),
  response: 'length',
  conditions: ['genotype', 'dose'],
  levels: ['lab', 'mouse'],
  reference: { genotype: 'KO', dose: '0' },
})

describe('AnalysisSettingsForm', () => {
  it('offers a reference per chosen factor: a list when its labels are known, free text otherwise', () => {
    const wrapper = mountForm(twoFactors())
    const fields = wrapper.findAll('[data-testid="setting-reference"]')
    expect(fields.map((f) => f.attributes('data-factor'))).toEqual(['genotype', 'dose'])
    expect(fields[0].classes()).toContain('v-select')
    expect(fields[1].classes()).toContain('v-text-field')
    expect(fields[1].find('input').element.value).toBe('0')
    expect(wrapper.text()).toContain('Fitted as genotype × dose')
  })

  it('no longer asks for the error bar: it is a display preference now', () => {
    const wrapper = mountForm(twoFactors())
    expect(wrapper.text()).not.toContain('Error bars shown first')
    expect(wrapper.text()).toContain('chosen on the result page')
  })

  it('shows each problem at its own field', () => {
    const wrapper = mountForm(twoFactors(), {
      'reference.genotype': '“XX” is not a value of “genotype”',
      covariates: '“genotype” holds no numbers',
      form: '"lab" is used twice; each column can have one role',
    })
    expect(wrapper.get('[data-factor="genotype"]').text()).toContain('is not a value of “genotype”')
    expect(wrapper.get('[data-testid="setting-covariates"]').text()).toContain('holds no numbers')
    expect(wrapper.get('[data-testid="settings-problem"]').text()).toContain('used twice')
  })

  it('forgets the reference of a factor that is taken out of the conditions', async () => {
    const draft = twoFactors()
    const wrapper = mountForm(draft)
    await wrapper.setProps({ modelValue: draft })
    draft.conditions.splice(1, 1)
    await wrapper.setProps({ modelValue: { ...draft } })
    await nextTick()
    expect(wrapper.props('modelValue').reference).toEqual({ genotype: 'KO' })
    expect(wrapper.findAll('[data-testid="setting-reference"]')).toHaveLength(1)
  })
})

describe('AnalysisSettingsForm, the kind of response', () => {
  const neurons: FormDefaults = {
    columns: ['lab', 'mouse', 'marker', 'puncta'],
    numericColumns: ['puncta'],
    labelsByColumn: { marker: ['negative', 'positive'] },
    binaryColumns: { marker: ['negative', 'positive'] },
    countColumns: ['puncta'],
  }

  it('suggests yes/no for a two-valued response and switches only when the person confirms', async () => {
    stubMissingBrowserApis()
    const updates: SettingsDraft[] = []
    const wrapper = mount(AnalysisSettingsForm, {
      props: {
        modelValue: { ...draftFrom(null), response: 'marker', levels: ['lab', 'mouse'] },
        defaults: neurons,
        problems: {},
        'onUpdate:modelValue': (draft: SettingsDraft) => void updates.push(draft),
      },
      global: { plugins: [createNestwiseVuetify()] },
      attachTo: document.body,
    })
    const suggestion = wrapper.get('[data-testid="family-suggestion"]')
    expect(suggestion.attributes('data-family')).toBe('binomial')
    expect(suggestion.text()).toContain('“marker” holds two values (negative, positive)')
    // A text column cannot be a measurement: nothing to decline.
    expect(wrapper.find('[data-testid="decline-family"]').exists()).toBe(false)
    expect(updates).toEqual([])
    await wrapper.get('[data-testid="accept-family"]').trigger('click')
    expect(updates.at(-1)).toMatchObject({ family: 'binomial', positive: 'positive' })
    await wrapper.setProps({ modelValue: updates.at(-1)! })
    expect(wrapper.find('[data-testid="family-suggestion"]').exists()).toBe(false)
    expect(wrapper.get('[data-testid="setting-positive"]').text()).toContain('positive')
  })

  it('offers counts for whole numbers, and lets the person keep a measurement', async () => {
    stubMissingBrowserApis()
    const wrapper = mountFormWith(neurons, { ...draftFrom(null), response: 'puncta', levels: ['lab'] })
    expect(wrapper.get('[data-testid="family-suggestion"]').attributes('data-family')).toBe('poisson')
    await wrapper.get('[data-testid="decline-family"]').trigger('click')
    expect(wrapper.find('[data-testid="family-suggestion"]').exists()).toBe(false)
  })
})

function mountFormWith(formDefaults: FormDefaults, draft: SettingsDraft) {
  return mount(AnalysisSettingsForm, {
    props: {
      modelValue: draft,
      defaults: formDefaults,
      problems: {},
      'onUpdate:modelValue': () => undefined,
    },
    global: { plugins: [createNestwiseVuetify()] },
    attachTo: document.body,
  })
}
