// @vitest-environment happy-dom
import { afterEach, describe, expect, it, vi } from 'vitest'
import { UPLOAD_ROUTE_NAME } from '@/components/overview/next-step'
import { fakeFetch } from '@/testing/fake-fetch'
import { mountWithApp } from '@/testing/mount-with-app'
import { routes } from '@/router/routes'
import { beaBiostatistician, nellNoLab, orlaAdmin, samiScientist } from '@/testing/users'
import type { CurrentUser } from '../../shared/schemas/auth'
import OverviewView from './OverviewView.vue'

afterEach(() => {
  vi.unstubAllGlobals()
  document.body.innerHTML = ''
})

function serverKnows(user: CurrentUser) {
  vi.stubGlobal(
    'fetch',
    fakeFetch({ 'GET /api/v1/auth/session': { status: 200, body: { data: user } } }).fetch,
  )
}

describe('OverviewView', () => {
  it('greets by first name and lists each lab with the role held there', async () => {
    serverKnows(beaBiostatistician)
    const { wrapper } = await mountWithApp(OverviewView)

    expect(wrapper.find('h1').text()).toBe('Welcome, Bea')
    const labs = wrapper.findAll('[data-testid="lab-role"]').map((el) => el.text())
    expect(labs).toHaveLength(2)
    expect(labs[0]).toContain('Nimbus Neurite Lab')
    expect(labs[0]).toContain('Biostatistician')
    expect(labs[1]).toContain('Fernhill Culture Lab')
  })

  it('offers a scientist the upload page', async () => {
    serverKnows(samiScientist)
    const { wrapper } = await mountWithApp(OverviewView)

    const step = wrapper.find('[data-testid="next-step"]')
    expect(step.attributes('data-step')).toBe('upload-first-table')
    expect(step.text()).toContain('Upload a per-cell table to start')
    const action = step.find('[data-testid="next-step-action"]')
    expect(action.text()).toBe('Upload a table')
    expect(action.attributes('href')).toBe('/datasets/upload')
  })

  it('sends a biostatistician, who does not upload, to the lab datasets instead', async () => {
    serverKnows(beaBiostatistician)
    const { wrapper } = await mountWithApp(OverviewView)

    const step = wrapper.find('[data-testid="next-step"]')
    expect(step.attributes('data-step')).toBe('read-lab-datasets')
    const action = step.find('[data-testid="next-step-action"]')
    expect(action.text()).toBe('See datasets')
    expect(action.attributes('href')).toBe('/datasets')
  })

  it('shows no button for a step whose page is not registered', async () => {
    serverKnows(samiScientist)
    const withoutUpload = routes.filter((r) => r.name !== UPLOAD_ROUTE_NAME)
    const { wrapper } = await mountWithApp(OverviewView, { routes: withoutUpload })

    expect(wrapper.find('[data-testid="next-step"]').text()).toContain('Upload a per-cell table to start')
    expect(wrapper.find('[data-testid="next-step-action"]').exists()).toBe(false)
  })

  it('tells someone without a lab whom to ask', async () => {
    serverKnows(nellNoLab)
    const { wrapper } = await mountWithApp(OverviewView)
    expect(wrapper.find('[data-testid="next-step"]').attributes('data-step')).toBe('join-a-lab')
    expect(wrapper.text()).toContain('Ask the admin of this Nestwise instance')
  })

  it('shows the admin as instance admin without a lab', async () => {
    serverKnows(orlaAdmin)
    const { wrapper } = await mountWithApp(OverviewView)
    expect(wrapper.find('[data-testid="next-step"]').attributes('data-step')).toBe('instance-admin')
    expect(wrapper.find('[data-testid="lab-role-admin"]').text()).toContain('Instance admin')
    expect(wrapper.findAll('[data-testid="lab-role"]')).toHaveLength(0)
  })
})
