// @vitest-environment happy-dom
import { afterEach, describe, expect, it, vi } from 'vitest'
import type { CurrentUser } from '../../shared/schemas/auth'
import { mountWithApp } from '@/testing/mount-with-app'
import { settle } from '@/testing/settle'
import { samiScientist } from '@/testing/users'
import JoinLabView from './JoinLabView.vue'

const TOKEN = 'T'.repeat(43)
const anonymous = { status: 401, body: { error: { code: 'UNAUTHENTICATED', message: 'Sign in first.' } } }
const preview = {
  labName: 'Nimbus Neurite Lab',
  role: 'scientist',
  email: 'nell@example.org',
  invitedByName: 'Petra Nimbus',
  expiresAt: '2026-12-09T10:00:00.000Z',
  accountExists: false,
}
const nell: CurrentUser = {
  id: 12,
  email: 'nell@example.org',
  name: 'Nell Vane',
  isAdmin: false,
  memberships: [{ labId: 1, labName: 'Nimbus Neurite Lab', role: 'scientist' }],
}

type Answer = { status: number; body?: unknown }

/** A fetch stand-in whose answers may change as the story goes on (signed out, then in). */
function scriptedFetch(answer: (method: string, path: string, body: unknown) => Answer) {
  const calls: { method: string; path: string; body: unknown }[] = []
  const fn = async (input: RequestInfo | URL, init: RequestInit = {}) => {
    const method = init.method ?? 'GET'
    const path = String(input)
    const body = init.body ? JSON.parse(String(init.body)) : undefined
    calls.push({ method, path, body })
    const { status, body: out } = answer(method, path, body)
    return new Response(out === undefined ? null : JSON.stringify(out), {
      status,
      headers: { 'Content-Type': 'application/json' },
    })
  }
  return { fetch: fn, calls }
}

afterEach(() => {
  vi.unstubAllGlobals()
  document.body.innerHTML = ''
})

describe('JoinLabView', () => {
  it('lets a new person choose a name and a password, join, and land on the overview signed in', async () => {
    let joined = false
    const fake = scriptedFetch((method, path) => {
      if (path === '/api/v1/auth/session') return joined ? { status: 200, body: { data: nell } } : anonymous
      if (path === '/api/v1/invitations/lookup') return { status: 200, body: { data: preview } }
      if (path === '/api/v1/invitations/accept') {
        joined = true
        return {
          status: 200,
          body: { data: { user: nell, labId: 1, labName: 'Nimbus Neurite Lab', role: 'scientist' } },
        }
      }
      throw new Error(`unexpected ${method} ${path}`)
    })
    vi.stubGlobal('fetch', fake.fetch)
    const { wrapper, router } = await mountWithApp(JoinLabView, { path: `/join#${TOKEN}` })
    await settle()

    expect(wrapper.find('[data-testid="join-title"]').text()).toBe('Join Nimbus Neurite Lab')
    expect(wrapper.text()).toContain('Petra Nimbus invited')
    expect(fake.calls.find((c) => c.path === '/api/v1/invitations/lookup')?.body).toEqual({ token: TOKEN })

    await wrapper.find('input[autocomplete="name"]').setValue('Nell Vane')
    const [password, repeat] = wrapper.findAll('input[autocomplete="new-password"]')
    await password.setValue('a long new password')
    await repeat.setValue('a long new password')
    await wrapper.find('form').trigger('submit')
    await settle()

    expect(fake.calls.find((c) => c.path === '/api/v1/invitations/accept')?.body).toEqual({
      token: TOKEN,
      name: 'Nell Vane',
      password: 'a long new password',
    })
    await vi.waitFor(() => expect(router.currentRoute.value.name).toBe('overview'))
  })

  it('does not send two different passwords', async () => {
    const fake = scriptedFetch((_method, path) =>
      path === '/api/v1/auth/session' ? anonymous : { status: 200, body: { data: preview } },
    )
    vi.stubGlobal('fetch', fake.fetch)
    const { wrapper } = await mountWithApp(JoinLabView, { path: `/join#${TOKEN}` })
    await settle()
    await wrapper.find('input[autocomplete="name"]').setValue('Nell Vane')
    const [password, repeat] = wrapper.findAll('input[autocomplete="new-password"]')
    await password.setValue('a long new password')
    await repeat.setValue('another long password')
    await wrapper.find('form').trigger('submit')
    await settle()
    expect(wrapper.text()).toContain('The two passwords differ.')
    expect(fake.calls.some((c) => c.path === '/api/v1/invitations/accept')).toBe(false)
  })

  it('explains a link that can no longer be used, in the server’s words', async () => {
    const fake = scriptedFetch((_method, path) =>
      path === '/api/v1/auth/session'
        ? anonymous
        : {
            status: 404,
            body: {
              error: {
                code: 'NOT_FOUND',
                message: 'This invitation has expired.',
                details: { reason: 'expired' },
              },
            },
          },
    )
    vi.stubGlobal('fetch', fake.fetch)
    const { wrapper } = await mountWithApp(JoinLabView, { path: `/join#${TOKEN}` })
    await settle()
    expect(wrapper.text()).toContain('This invitation cannot be used')
    expect(wrapper.find('[data-testid="error-notice"]').text()).toContain('This invitation has expired.')
  })

  it('asks someone signed in with another account to sign out first', async () => {
    const fake = scriptedFetch((_method, path) =>
      path === '/api/v1/auth/session'
        ? { status: 200, body: { data: samiScientist } }
        : { status: 200, body: { data: preview } },
    )
    vi.stubGlobal('fetch', fake.fetch)
    const { wrapper } = await mountWithApp(JoinLabView, { path: `/join#${TOKEN}` })
    await settle()
    expect(wrapper.find('[data-testid="join-other-account"]').text()).toContain(
      'signed in as sami@example.org',
    )
    expect(wrapper.find('form').exists()).toBe(false)
  })

  it('asks for the link when the page is opened without a token', async () => {
    vi.stubGlobal('fetch', scriptedFetch(() => anonymous).fetch)
    const { wrapper } = await mountWithApp(JoinLabView, { path: '/join' })
    await settle()
    expect(wrapper.text()).toContain('This page needs your invitation link')
  })
})
