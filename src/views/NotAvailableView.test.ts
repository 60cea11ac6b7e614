// @vitest-environment happy-dom
import { afterEach, describe, expect, it, vi } from 'vitest'
import { fakeFetch } from '@/testing/fake-fetch'
import { mountWithApp } from '@/testing/mount-with-app'
import { samiScientist } from '@/testing/users'
import NotAvailableView from './NotAvailableView.vue'

afterEach(() => {
  vi.unstubAllGlobals()
  document.body.innerHTML = ''
})

describe('NotAvailableView', () => {
  it('says who the refused page is for and which roles the person holds', async () => {
    vi.stubGlobal(
      'fetch',
      fakeFetch({ 'GET /api/v1/auth/session': { status: 200, body: { data: samiScientist } } }).fetch,
    )
    const { wrapper } = await mountWithApp(NotAvailableView, {
      path: '/not-available?page=/lab/board',
    })

    expect(wrapper.find('h1').text()).toBe('Not available for your role')
    expect(wrapper.find('[data-testid="needed-role"]').text()).toBe('This page is for: PI (lab head).')
    expect(wrapper.text()).toContain('You are signed in as Scientist in Nimbus Neurite Lab.')
  })

  it('ignores a page parameter that points off-site', async () => {
    vi.stubGlobal(
      'fetch',
      fakeFetch({ 'GET /api/v1/auth/session': { status: 200, body: { data: samiScientist } } }).fetch,
    )
    const { wrapper } = await mountWithApp(NotAvailableView, {
      path: '/not-available?page=//elsewhere.example',
    })
    expect(wrapper.find('[data-testid="needed-role"]').exists()).toBe(false)
  })
})
