// @vitest-environment happy-dom
import { flushPromises } from '@vue/test-utils'
import { afterEach, describe, expect, it, vi } from 'vitest'
import type { CurrentUser } from '../../shared/schemas/auth'
import { dataset, project } from '@/testing/datasets'
import { fakeFetch } from '@/testing/fake-fetch'
import { mountWithApp } from '@/testing/mount-with-app'
import { beaBiostatistician, orlaAdmin, samiScientist } from '@/testing/users'
import DatasetsView from './DatasetsView.vue'

afterEach(() => {
  vi.unstubAllGlobals()
  document.body.innerHTML = ''
})

function server(user: CurrentUser, datasets: unknown, projects: unknown[] = []) {
  const fake = fakeFetch({
    'GET /api/v1/auth/session': { status: 200, body: { data: user } },
    'GET /api/v1/datasets': datasets as { status: number; body: unknown },
    'GET /api/v1/projects': { status: 200, body: { data: projects } },
  })
  vi.stubGlobal('fetch', fake.fetch)
  return fake
}

const ok = (data: unknown) => ({ status: 200, body: { data } })

describe('DatasetsView', () => {
  it('invites a scientist with no datasets yet to upload a per-cell table', async () => {
    server(samiScientist, ok([]))
    const { wrapper } = await mountWithApp(DatasetsView, { path: '/datasets' })
    const empty = wrapper.find('[data-testid="datasets-empty"]')
    expect(empty.text()).toContain('Upload a per-cell table to start')
    expect(empty.find('a').attributes('href')).toBe('/datasets/upload')
  })

  it('lists datasets by lab and project, names as text, and offers no upload to a biostatistician', async () => {
    server(
      beaBiostatistician,
      ok([
        dataset({ name: 'Dose <b>series</b>', description: 'Plate reader, three doses' }),
        dataset({
          id: 2,
          labId: 2,
          labName: 'Fernhill Culture Lab',
          project: { id: 3, name: 'Agreement' },
          name: 'Fernhill neurites',
        }),
      ]),
      [project(), project({ id: 3, labId: 2, name: 'Agreement', description: 'Three labs, one protocol' })],
    )
    const { wrapper } = await mountWithApp(DatasetsView, { path: '/datasets' })

    const labs = wrapper.findAll('section')
    expect(labs.map((s) => s.find('h2').text())).toEqual(['Nimbus Neurite Lab', 'Fernhill Culture Lab'])
    const link = labs[0].find('[data-testid="dataset-link"]')
    expect(link.text()).toBe('Dose <b>series</b>')
    expect(link.find('b').exists()).toBe(false)
    expect(link.attributes('href')).toBe('/datasets/1')
    expect(labs[1].text()).toContain('Three labs, one protocol')
    expect(wrapper.find('[data-testid="datasets-upload"]').exists()).toBe(false)
    expect(wrapper.text()).not.toContain('Upload here')
  })

  it('shows one lab at a time when asked', async () => {
    server(
      beaBiostatistician,
      ok([
        dataset(),
        dataset({ id: 2, labId: 2, labName: 'Fernhill Culture Lab', project: { id: 3, name: 'Agreement' } }),
      ]),
    )
    const { wrapper } = await mountWithApp(DatasetsView, { path: '/datasets' })
    const fernhill = wrapper.findAll('.v-chip').find((c) => c.text() === 'Fernhill Culture Lab')!
    await fernhill.trigger('click')
    await flushPromises()
    expect(wrapper.findAll('section').map((s) => s.find('h2').text())).toEqual(['Fernhill Culture Lab'])
  })

  it('tells the instance admin there is no lab, and where deleted datasets are', async () => {
    server(orlaAdmin, ok([]))
    const { wrapper } = await mountWithApp(DatasetsView, { path: '/datasets' })
    expect(wrapper.find('[data-testid="datasets-no-lab"]').exists()).toBe(true)
    expect(wrapper.find('[data-testid="deleted-datasets-link"]').attributes('href')).toBe('/datasets/deleted')
  })

  it('shows a failed load with a way to try again', async () => {
    const fake = server(samiScientist, {
      status: 500,
      body: { error: { code: 'INTERNAL', message: 'The database is restarting.' } },
    })
    const { wrapper } = await mountWithApp(DatasetsView, { path: '/datasets' })
    expect(wrapper.find('[data-testid="error-notice"]').text()).toContain('The database is restarting.')
    await wrapper.find('[data-testid="error-notice"] button').trigger('click')
    await flushPromises()
    expect(fake.calls.filter((c) => c.path === '/api/v1/datasets')).toHaveLength(2)
  })
})
