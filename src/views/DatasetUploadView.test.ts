// @vitest-environment happy-dom
import { flushPromises, type VueWrapper } from '@vue/test-utils'
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest'
import type { CurrentUser } from '../../shared/schemas/auth'
import { datasetDetail, project } from '@/testing/datasets'
import { fakeFetch } from '@/testing/fake-fetch'
import { FakeXhr } from '@/testing/fake-xhr'
import { mountWithApp } from '@/testing/mount-with-app'
import { beaBiostatistician, samiScientist } from '@/testing/users'
import DatasetUploadView from './DatasetUploadView.vue'

beforeEach(() => {
  FakeXhr.sent = []
  vi.stubGlobal('XMLHttpRequest', FakeXhr)
})
afterEach(() => {
  vi.unstubAllGlobals()
  document.body.innerHTML = ''
})

function server(user: CurrentUser) {
  vi.stubGlobal(
    'fetch',
    fakeFetch({
      'GET /api/v1/auth/session': { status: 200, body: { data: user } },
      'GET /api/v1/projects': { status: 200, body: { data: [project({ id: 4, name: 'Neurite pilot' })] } },
    }).fetch,
  )
}

const projectField = (wrapper: VueWrapper) =>
  wrapper.findComponent('[data-testid="upload-project"]') as VueWrapper

async function pickFile(wrapper: VueWrapper, file: File) {
  const input = wrapper.find('[data-testid="upload-file-input"]')
  Object.defineProperty(input.element, 'files', { value: [file], configurable: true })
  await input.trigger('change')
  await flushPromises()
}

const table = new File(['lab,mouse,neurite_length_um\nnimbus,m1,81.2\n'], 'neurites-march.csv', {
  type: 'text/csv',
})

describe('DatasetUploadView', () => {
  it('explains to a biostatistician that uploading needs another role', async () => {
    server(beaBiostatistician)
    const { wrapper } = await mountWithApp(DatasetUploadView, { path: '/datasets/upload' })
    expect(wrapper.text()).toContain('Uploading needs a lab role')
    expect(wrapper.find('[data-testid="upload-drop-zone"]').exists()).toBe(false)
  })

  it('uploads into an existing project, then opens the new dataset on its nesting', async () => {
    server(samiScientist)
    const { wrapper, router } = await mountWithApp(DatasetUploadView, {
      path: '/datasets/upload?projectId=4',
    })
    expect((projectField(wrapper).props() as { modelValue: unknown }).modelValue).toBe('Neurite pilot')
    expect(wrapper.find('[data-testid="upload-start"]').attributes('disabled')).toBeDefined()

    await pickFile(wrapper, table)
    expect((wrapper.find('[data-testid="upload-name"] input').element as HTMLInputElement).value).toBe(
      'neurites-march',
    )
    await wrapper.find('[data-testid="upload-start"]').trigger('click')
    await flushPromises()

    const xhr = FakeXhr.sent[0]
    const form = xhr.body as FormData
    expect(xhr.url).toBe('/api/v1/datasets')
    expect(form.get('labId')).toBe('1')
    expect(form.get('projectId')).toBe('4')
    expect(form.get('projectName')).toBeNull()
    expect(form.get('name')).toBe('neurites-march')
    expect((form.get('file') as File).name).toBe('neurites-march.csv')
    expect(xhr.headers['x-upload-token']).toMatch(/^[0-9a-f]{32}$/)
    expect(wrapper.find('[data-testid="upload-progress"]').exists()).toBe(true)

    xhr.respond(201, { data: datasetDetail({ id: 7 }) })
    await flushPromises()
    // The dataset page is loaded on demand, which takes a moment the first time.
    await vi.waitFor(() => expect(router.currentRoute.value.fullPath).toBe('/datasets/7?tab=nesting'), {
      timeout: 20_000,
    })
  })

  it('creates a project by name when the typed name is new', async () => {
    server(samiScientist)
    const { wrapper } = await mountWithApp(DatasetUploadView, { path: '/datasets/upload' })
    projectField(wrapper).vm.$emit('update:modelValue', 'Dose series')
    await flushPromises()
    expect(wrapper.text()).toContain('A new project of this name will be created in the lab.')
    await pickFile(wrapper, table)
    await wrapper.find('[data-testid="upload-start"]').trigger('click')
    await flushPromises()
    const form = FakeXhr.sent[0].body as FormData
    expect(form.get('projectName')).toBe('Dose series')
    expect(form.get('projectId')).toBeNull()
  })

  it('shows a refused file next to the drop zone and stays on the page', async () => {
    server(samiScientist)
    const { wrapper, router } = await mountWithApp(DatasetUploadView, {
      path: '/datasets/upload?projectId=4',
    })
    await pickFile(wrapper, table)
    await wrapper.find('[data-testid="upload-start"]').trigger('click')
    await flushPromises()
    FakeXhr.sent[0].respond(400, {
      error: {
        code: 'INVALID_PAYLOAD',
        message: 'Column 2 has no name. Give every column a header.',
        details: { reason: 'BLANK_HEADER', row: 1, columnNumber: 2 },
      },
    })
    await flushPromises()
    const error = wrapper.find('[data-testid="upload-error"]')
    expect(error.text()).toContain('Column 2 has no name.')
    expect(error.text()).toContain('Row 1')
    expect(wrapper.find('[data-testid="upload-progress"]').exists()).toBe(false)
    expect(router.currentRoute.value.path).toBe('/datasets/upload')
  })
})
