// @vitest-environment happy-dom
import { flushPromises } from '@vue/test-utils'
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest'
import { versionDetail } from '@/testing/datasets'
import { FakeXhr } from '@/testing/fake-xhr'
import { mountWithVuetify } from '@/testing/mount-with-vuetify'
import NewVersionDialog from './NewVersionDialog.vue'

beforeEach(() => {
  FakeXhr.sent = []
  vi.stubGlobal('XMLHttpRequest', FakeXhr)
  // The progress poll is a courtesy; here the server does not know the token yet.
  vi.stubGlobal(
    'fetch',
    async () =>
      new Response(JSON.stringify({ error: { code: 'NOT_FOUND', message: 'No.' } }), { status: 404 }),
  )
})
afterEach(() => {
  vi.unstubAllGlobals()
  document.body.innerHTML = ''
})

const query = (testId: string) => document.querySelector(`[data-testid="${testId}"]`) as HTMLElement

async function openWithFile() {
  const wrapper = mountWithVuetify(NewVersionDialog, { modelValue: true, datasetId: 4, nextVersionNo: 3 })
  await flushPromises()
  await vi.waitFor(() => expect(query('new-version-dialog')).not.toBeNull())
  const input = query('upload-file-input') as HTMLInputElement
  const file = new File(['lab,mouse,neurite_length_um\nnimbus,m1,80.1\n'], 'neurites-fixed.csv', {
    type: 'text/csv',
  })
  Object.defineProperty(input, 'files', { value: [file], configurable: true })
  input.dispatchEvent(new Event('change'))
  await flushPromises()
  return wrapper
}

describe('NewVersionDialog', () => {
  it('uploads the next version of the dataset and hands it over', async () => {
    const wrapper = await openWithFile()
    expect(query('new-version-dialog').textContent).toContain('Upload version 3')
    query('new-version-start').click()
    await flushPromises()

    const xhr = FakeXhr.sent[0]
    expect(xhr.url).toBe('/api/v1/datasets/4/versions')
    expect(((xhr.body as FormData).get('file') as File).name).toBe('neurites-fixed.csv')
    const uploaded = versionDetail({ id: 12, datasetId: 4, versionNo: 3 })
    xhr.respond(201, { data: uploaded })
    await flushPromises()

    expect(wrapper.emitted('uploaded')).toEqual([[uploaded]])
    expect(wrapper.emitted('update:modelValue')).toEqual([[false]])
  })

  it('keeps a refused file’s message in the dialog', async () => {
    const wrapper = await openWithFile()
    query('new-version-start').click()
    await flushPromises()
    FakeXhr.sent[0].respond(400, {
      error: {
        code: 'INVALID_PAYLOAD',
        message: 'The file has a header but no rows.',
        details: { reason: 'HEADER_ONLY' },
      },
    })
    await flushPromises()
    expect(query('upload-error').textContent).toContain('The file has a header but no rows.')
    expect(wrapper.emitted('uploaded')).toBeUndefined()
  })
})
