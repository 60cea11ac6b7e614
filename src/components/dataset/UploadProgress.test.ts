// @vitest-environment happy-dom
import { afterEach, describe, expect, it } from 'vitest'
import type { UploadProgress as Progress } from '../../../shared/schemas/datasets'
import { mountWithVuetify } from '@/testing/mount-with-vuetify'
import UploadProgress from './UploadProgress.vue'

afterEach(() => {
  document.body.innerHTML = ''
})

const report = (fields: Partial<Progress>): Progress => ({
  token: 'tok12345',
  phase: 'receiving',
  bytesRead: 0,
  bytesTotal: 0,
  rowsStored: 0,
  message: null,
  ...fields,
})

const barValue = (wrapper: ReturnType<typeof mountWithVuetify>, id: string) =>
  Number(wrapper.find(`[data-testid="${id}"]`).attributes('aria-valuenow'))

describe('UploadProgress', () => {
  it('shows how much of the file has been sent, and offers to cancel meanwhile', async () => {
    const wrapper = mountWithVuetify(UploadProgress, {
      stage: 'sending',
      sent: 7_000_000,
      total: 28_000_000,
      server: null,
    })
    expect(barValue(wrapper, 'transfer-bar')).toBe(25)
    expect(wrapper.find('[data-testid="transfer-text"]').text()).toBe('7.0 MB of 28.0 MB')
    expect(barValue(wrapper, 'server-bar')).toBe(0)
    await wrapper.find('[data-testid="upload-cancel"]').trigger('click')
    expect(wrapper.emitted('cancel')).toHaveLength(1)
  })

  it('follows the server while it stores rows, without a cancel button', () => {
    const wrapper = mountWithVuetify(UploadProgress, {
      stage: 'processing',
      sent: 28_000_000,
      total: 28_000_000,
      server: report({
        phase: 'storing',
        bytesRead: 21_000_000,
        bytesTotal: 28_000_000,
        rowsStored: 750_000,
      }),
    })
    expect(barValue(wrapper, 'transfer-bar')).toBe(100)
    expect(barValue(wrapper, 'server-bar')).toBe(75)
    expect(wrapper.find('[data-testid="server-text"]').text()).toBe('Storing rows · 750,000 rows so far')
    expect(wrapper.find('[data-testid="upload-cancel"]').exists()).toBe(false)
  })

  it('says what the server does when there is no fraction to show', () => {
    const checking = mountWithVuetify(UploadProgress, {
      stage: 'processing',
      sent: 10,
      total: 10,
      server: null,
    })
    expect(checking.find('[data-testid="server-text"]').text()).toContain('Checking the file')
    // Indeterminate: no value announced, a moving bar instead.
    expect(checking.find('[data-testid="server-bar"]').attributes('aria-valuenow')).toBeUndefined()
    expect(checking.find('[data-testid="server-bar"] .v-progress-linear__indeterminate').exists()).toBe(true)

    const profiling = mountWithVuetify(UploadProgress, {
      stage: 'processing',
      sent: 10,
      total: 10,
      server: report({ phase: 'profiling', rowsStored: 72 }),
    })
    expect(profiling.find('[data-testid="server-text"]').text()).toBe(
      'Summarising columns and suggesting the nesting · 72 rows stored',
    )
  })

  it('ends full, with the number of rows stored', () => {
    const wrapper = mountWithVuetify(UploadProgress, {
      stage: 'done',
      sent: 10,
      total: 10,
      server: report({ phase: 'done', rowsStored: 72 }),
    })
    expect(barValue(wrapper, 'server-bar')).toBe(100)
    expect(wrapper.find('[data-testid="server-text"]').text()).toBe('Done · 72 rows stored')
  })
})
