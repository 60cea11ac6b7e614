// @vitest-environment happy-dom
import { flushPromises } from '@vue/test-utils'
import { defineComponent, h } from 'vue'
import { VApp } from 'vuetify/components'
import { afterEach, describe, expect, it, vi } from 'vitest'
import { fakeFetch } from '@/testing/fake-fetch'
import { mountWithApp } from '@/testing/mount-with-app'
import { beaBiostatistician, orlaAdmin } from '@/testing/users'
import type { CurrentUser } from '../../../shared/schemas/auth'
import AppShell from './AppShell.vue'

afterEach(() => {
  vi.unstubAllGlobals()
  document.body.innerHTML = ''
})

function serverKnows(user: CurrentUser, logout: { status: number; body?: unknown } = { status: 204 }) {
  const fake = fakeFetch({
    'GET /api/v1/auth/session': { status: 200, body: { data: user } },
    'POST /api/v1/auth/logout': logout,
  })
  vi.stubGlobal('fetch', fake.fetch)
  return fake
}

// The shell is wrapped in v-app as in App.vue; Vuetify layout parts need it.
const ShellInApp = defineComponent({
  render: () => h(VApp, () => h(AppShell, () => h('p', 'page'))),
})

async function openAccountMenu(wrapper: Awaited<ReturnType<typeof mountWithApp>>['wrapper']) {
  await wrapper.find('[data-testid="account-button"]').trigger('click')
  await flushPromises()
  await vi.waitFor(() => expect(document.querySelector('[data-testid="account-menu"]')).not.toBeNull())
  return document.querySelector('[data-testid="account-menu"]') as HTMLElement
}

describe('AppShell', () => {
  it('shows the navigation entries and the signed-in name', async () => {
    serverKnows(beaBiostatistician)
    const { wrapper } = await mountWithApp(ShellInApp)

    const nav = wrapper.find('[data-testid="main-nav"]')
    expect(nav.find('[data-testid="nav-overview"]').text()).toContain('Overview')
    expect(wrapper.find('[data-testid="account-button"]').text()).toContain('BS')
    expect(wrapper.text()).toContain('page')
  })

  it('lists every lab with its role in the account menu', async () => {
    serverKnows(beaBiostatistician)
    const { wrapper } = await mountWithApp(ShellInApp)
    const menu = await openAccountMenu(wrapper)

    expect(menu.textContent).toContain('bea@example.org')
    const memberships = [...menu.querySelectorAll('[data-testid="account-membership"]')].map(
      (el) => el.textContent,
    )
    expect(memberships).toEqual([
      expect.stringMatching(/Nimbus Neurite Lab.*Biostatistician/),
      expect.stringMatching(/Fernhill Culture Lab.*Biostatistician/),
    ])
    expect(menu.querySelector('[data-testid="account-admin"]')).toBeNull()
  })

  it('marks the instance admin in the account menu', async () => {
    serverKnows(orlaAdmin)
    const { wrapper } = await mountWithApp(ShellInApp)
    const menu = await openAccountMenu(wrapper)
    expect(menu.querySelector('[data-testid="account-admin"]')?.textContent).toContain('Instance admin')
  })

  it('signs out and returns to the sign-in page', async () => {
    const fake = serverKnows(beaBiostatistician)
    const { wrapper, router } = await mountWithApp(ShellInApp)
    const menu = await openAccountMenu(wrapper)

    ;(menu.querySelector('[data-testid="sign-out"]') as HTMLElement).click()
    await flushPromises()

    expect(fake.calls.some((c) => c.method === 'POST' && c.path === '/api/v1/auth/logout')).toBe(true)
    await vi.waitFor(() => expect(router.currentRoute.value.name).toBe('sign-in'))
  })

  it('shows a failed sign-out inside the menu and stays signed in', async () => {
    serverKnows(beaBiostatistician, {
      status: 500,
      body: { error: { code: 'INTERNAL', message: 'The session store is not answering.' } },
    })
    const { wrapper, router } = await mountWithApp(ShellInApp)
    const menu = await openAccountMenu(wrapper)

    ;(menu.querySelector('[data-testid="sign-out"]') as HTMLElement).click()
    await flushPromises()

    await vi.waitFor(() => expect(menu.textContent).toContain('The session store is not answering.'))
    expect(menu.textContent).toContain('Could not sign out')
    expect(router.currentRoute.value.name).toBe('overview')
  })
})
