// @vitest-environment happy-dom
import { flushPromises } from '@vue/test-utils'
import { afterEach, describe, expect, it, vi } from 'vitest'
import type { CurrentUser } from '../../shared/schemas/auth'
import { datasetDetail, neuriteDesign, tagging, versionDetail, versionSummary } from '@/testing/datasets'
import { fakeFetch } from '@/testing/fake-fetch'
import { mountWithApp } from '@/testing/mount-with-app'
import { beaBiostatistician, samiScientist } from '@/testing/users'
import DatasetDetailView from './DatasetDetailView.vue'

afterEach(() => {
  vi.unstubAllGlobals()
  document.body.innerHTML = ''
})

const ok = (data: unknown) => ({ status: 200, body: { data } })
const v1 = '/api/v1/datasets/1/versions/1'
const v2 = '/api/v1/datasets/1/versions/2'

function server(user: CurrentUser, answers: Record<string, { status: number; body?: unknown }>) {
  const fake = fakeFetch({ 'GET /api/v1/auth/session': ok(user), ...answers })
  vi.stubGlobal('fetch', fake.fetch)
  return fake
}

describe('DatasetDetailView', () => {
  it('opens on the nesting of the newest version, with the counts and the commands the person may use', async () => {
    server(samiScientist, {
      'GET /api/v1/datasets/1': ok(datasetDetail({ description: 'Fixed on day 7 <script>x</script>' })),
      [`GET ${v1}`]: ok(versionDetail({ excludedRowCount: 4 })),
    })
    const { wrapper } = await mountWithApp(DatasetDetailView, { path: '/datasets/1' })

    expect(wrapper.find('[data-testid="dataset-name"]').text()).toBe('Three-lab neurites')
    expect(wrapper.find('[data-testid="dataset-place"]').text()).toBe('Nimbus Neurite Lab · Neurite pilot')
    expect(wrapper.find('[data-testid="dataset-description"]').text()).toBe(
      'Fixed on day 7 <script>x</script>',
    )
    expect(wrapper.find('[data-testid="dataset-facts"]').text().replace(/\s+/g, ' ')).toBe(
      '72 observations · 5 columns · 4 left out',
    )
    expect(wrapper.find('[data-testid="nesting-status"]').text()).toBe('Nesting not saved yet')
    expect(wrapper.find('[data-testid="nesting-editor"]').exists()).toBe(true)
    for (const command of ['edit-details', 'new-version', 'delete-dataset']) {
      expect(wrapper.find(`[data-testid="${command}"]`).exists(), command).toBe(true)
    }
  })

  it('shows a reader the saved nesting without commands to change anything', async () => {
    server(beaBiostatistician, {
      'GET /api/v1/datasets/1': ok(
        datasetDetail({ permissions: { upload: false, edit: false, delete: false } }),
      ),
      [`GET ${v1}`]: ok(versionDetail({ tagging: tagging() })),
      [`GET ${v1}/design`]: ok(neuriteDesign),
    })
    const { wrapper } = await mountWithApp(DatasetDetailView, { path: '/datasets/1' })
    expect(wrapper.find('[data-testid="nesting-status"]').text()).toBe('Nesting saved')
    expect(wrapper.find('[data-testid="design-summary"]').exists()).toBe(true)
    for (const command of ['edit-details', 'new-version', 'delete-dataset', 'nesting-save']) {
      expect(wrapper.find(`[data-testid="${command}"]`).exists(), command).toBe(false)
    }
  })

  it('shows an older version when the address names it, and says which is newest', async () => {
    const detail = datasetDetail({
      latestVersion: versionSummary({ id: 2, versionNo: 2 }),
      versions: [versionSummary({ id: 2, versionNo: 2 }), versionSummary()],
      versionCount: 2,
    })
    server(samiScientist, {
      'GET /api/v1/datasets/1': ok(detail),
      [`GET ${v1}`]: ok(versionDetail()),
      [`GET ${v2}`]: ok(versionDetail({ id: 2, versionNo: 2 })),
    })
    const { wrapper, router } = await mountWithApp(DatasetDetailView, { path: '/datasets/1?version=1' })
    expect(wrapper.find('[data-testid="older-version"]').text()).toContain('the newest is version 2')

    await router.replace('/datasets/1')
    await flushPromises()
    expect(wrapper.find('[data-testid="older-version"]').exists()).toBe(false)
  })

  it('says plainly when the dataset is not there', async () => {
    server(samiScientist, {
      'GET /api/v1/datasets/9': {
        status: 404,
        body: { error: { code: 'NOT_FOUND', message: 'Dataset not found.' } },
      },
    })
    const { wrapper } = await mountWithApp(DatasetDetailView, { path: '/datasets/9' })
    expect(wrapper.text()).toContain('This dataset is not here')
    expect(wrapper.text()).toContain('a lab you are not a member of')
  })

  it('opens the tab the address names', async () => {
    server(samiScientist, {
      'GET /api/v1/datasets/1': ok(datasetDetail()),
      [`GET ${v1}`]: ok(versionDetail()),
    })
    const { wrapper } = await mountWithApp(DatasetDetailView, { path: '/datasets/1?tab=columns' })
    await vi.waitFor(() => expect(wrapper.find('[data-testid="column-summary"]').exists()).toBe(true))
    expect(wrapper.find('[data-testid="nesting-editor"]').exists()).toBe(false)
  })
})
