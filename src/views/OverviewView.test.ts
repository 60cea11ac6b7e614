// @vitest-environment happy-dom
import { afterEach, describe, expect, it, vi } from 'vitest'
import { UPLOAD_ROUTE_NAME } from '@/components/overview/next-step'
import { fakeFetch } from '@/testing/fake-fetch'
import { mountWithApp } from '@/testing/mount-with-app'
import { beaBiostatistician, nellNoLab, orlaAdmin } from '@/testing/users'
import type { CurrentUser } from '../../shared/schemas/auth'
import OverviewView from './OverviewView.vue'

afterEach(() => {
  vi.unstubAllGlobals()
  document.body.innerHTML = ''
})

function serverKnows(user: CurrentUser) {
  vi.stubGlobal('fetch', fakeFetch({ 'GET /api/v1/auth/me': { status: 200, body: { data: user } } }).fetch)
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

  it('tells a lab member to upload a table, with no button while uploading has no page', async () => {
    serverKnows(beaBiostatistician)
    const { wrapper } = await mountWithApp(OverviewView)

    const step = wrapper.find('[data-testid="next-step"]')
    expect(step.text()).toContain('Upload a per-cell table to start')
    expect(step.find('[data-testid="next-step-action"]').exists()).toBe(false)
  })

  it('shows the upload button once the upload route exists', async () => {
    serverKnows(beaBiostatistician)
    const { wrapper } = await mountWithApp(OverviewView, {
      extraRoutes: [{ path: '/upload', name: UPLOAD_ROUTE_NAME, component: { render: () => null } }],
    })

    const action = wrapper.find('[data-testid="next-step-action"]')
    expect(action.text()).toBe('Upload a table')
    expect(action.attributes('href')).toBe('/upload')
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
