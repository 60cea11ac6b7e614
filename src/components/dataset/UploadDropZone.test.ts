// @vitest-environment happy-dom
import { afterEach, describe, expect, it } from 'vitest'
import { ApiError } from '@/api/http'
import { mountWithVuetify } from '@/testing/mount-with-vuetify'
import UploadDropZone from './UploadDropZone.vue'

afterEach(() => {
  document.body.innerHTML = ''
})

const csv = (name: string) =>
  new File(['lab,mouse,neurite_length_um\nnimbus,m1,81.2\n'], name, { type: 'text/csv' })

function dropEvent(files: File[]) {
  return { dataTransfer: { files: Object.assign(files, { item: (k: number) => files[k] }) } }
}

describe('UploadDropZone', () => {
  it('takes a dropped file', async () => {
    const wrapper = mountWithVuetify(UploadDropZone, { modelValue: null })
    const file = csv('cells.csv')
    await wrapper.find('[data-testid="upload-drop-zone"]').trigger('drop', dropEvent([file]))
    expect(wrapper.emitted('update:modelValue')).toEqual([[file]])
  })

  it('refuses several files at once, saying why', async () => {
    const wrapper = mountWithVuetify(UploadDropZone, { modelValue: null })
    await wrapper
      .find('[data-testid="upload-drop-zone"]')
      .trigger('drop', dropEvent([csv('a.csv'), csv('b.csv')]))
    expect(wrapper.emitted('update:modelValue')).toBeUndefined()
    expect(wrapper.find('[data-testid="drop-refusal"]').text()).toContain('one file at a time')
  })

  it('takes a file from the picker and accepts the table formats', async () => {
    const wrapper = mountWithVuetify(UploadDropZone, { modelValue: null })
    const input = wrapper.find('[data-testid="upload-file-input"]')
    expect(input.attributes('accept')).toContain('.xlsx')
    expect(input.attributes('accept')).toContain('.tsv')
    const file = csv('cells.csv')
    Object.defineProperty(input.element, 'files', { value: [file], configurable: true })
    await input.trigger('change')
    expect(wrapper.emitted('update:modelValue')).toEqual([[file]])
  })

  it('shows a chosen file name with markup as text', () => {
    const wrapper = mountWithVuetify(UploadDropZone, { modelValue: csv('<img src=x onerror=alert(1)>.csv') })
    const chosen = wrapper.find('[data-testid="chosen-file"]')
    expect(chosen.text()).toBe('<img src=x onerror=alert(1)>.csv')
    expect(chosen.find('img').exists()).toBe(false)
  })

  it('shows the server’s refusal beside the drop zone, with the row and column it names', () => {
    const error = new ApiError({
      status: 400,
      code: 'INVALID_PAYLOAD',
      message: 'Row 14 has 4 values, but the header names only 3 columns.',
      details: { reason: 'RAGGED_ROW', row: 14, columnNumber: 4 },
    })
    const wrapper = mountWithVuetify(UploadDropZone, { modelValue: csv('cells.csv'), error })
    const shown = wrapper.find('[data-testid="upload-error"]')
    expect(shown.text()).toContain('This file could not be stored')
    expect(shown.text()).toContain('Row 14 has 4 values')
    expect(shown.findAll('.v-chip').map((c) => c.text())).toEqual(['Row 14', 'Column 4'])
  })

  it('ignores drops while disabled', async () => {
    const wrapper = mountWithVuetify(UploadDropZone, { modelValue: null, disabled: true })
    await wrapper.find('[data-testid="upload-drop-zone"]').trigger('drop', dropEvent([csv('a.csv')]))
    expect(wrapper.emitted('update:modelValue')).toBeUndefined()
  })
})
