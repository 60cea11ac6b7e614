import { createPinia, setActivePinia } from 'pinia'
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest'
import { fakeFetch } from '@/testing/fake-fetch'
import { beaBiostatistician, petraPi } from '@/testing/users'
import { useSessionStore } from './session'

const unauthenticated = {
  status: 401,
  body: { error: { code: 'UNAUTHENTICATED', message: 'Sign in first.' } },
}

beforeEach(() => setActivePinia(createPinia()))
afterEach(() => vi.unstubAllGlobals())

describe('useSessionStore', () => {
  it('load() keeps the current user and exposes role helpers', async () => {
    vi.stubGlobal(
      'fetch',
      fakeFetch({ 'GET /api/v1/auth/session': { status: 200, body: { data: beaBiostatistician } } }).fetch,
    )
    const session = useSessionStore()
    await session.load()
    expect(session.user?.name).toBe('Bea Stone')
    expect(session.isSignedIn).toBe(true)
    expect(session.hasRole('biostatistician')).toBe(true)
    expect(session.hasRole('pi', 'scientist')).toBe(false)
    expect(session.isAdmin).toBe(false)
  })

  it('load() treats 401 as "nobody signed in", not as an error', async () => {
    vi.stubGlobal('fetch', fakeFetch({ 'GET /api/v1/auth/session': unauthenticated }).fetch)
    const session = useSessionStore()
    await session.load()
    expect(session.user).toBeNull()
    expect(session.loadError).toBeNull()
    expect(session.loaded).toBe(true)
  })

  it('load() reads "nobody" from a plain answer of null', async () => {
    vi.stubGlobal(
      'fetch',
      fakeFetch({ 'GET /api/v1/auth/session': { status: 200, body: { data: null } } }).fetch,
    )
    const session = useSessionStore()
    await session.load()
    expect(session.user).toBeNull()
    expect(session.loadError).toBeNull()
  })

  it('load() keeps any other failure so the page can show it', async () => {
    vi.stubGlobal(
      'fetch',
      fakeFetch({
        'GET /api/v1/auth/session': {
          status: 503,
          body: { error: { code: 'INTERNAL', message: 'Database unavailable.' } },
        },
      }).fetch,
    )
    const session = useSessionStore()
    await session.load()
    expect(session.loadError?.message).toBe('Database unavailable.')
  })

  it('ensureLoaded() asks the server only once', async () => {
    const fake = fakeFetch({ 'GET /api/v1/auth/session': unauthenticated })
    vi.stubGlobal('fetch', fake.fetch)
    const session = useSessionStore()
    await session.ensureLoaded()
    await session.ensureLoaded()
    expect(fake.calls).toHaveLength(1)
  })

  it('signIn() keeps the API error message for the form and clears it on the next success', async () => {
    const answers: Record<string, { status: number; body?: unknown }> = {
      'POST /api/v1/auth/login': {
        status: 401,
        body: { error: { code: 'UNAUTHENTICATED', message: 'Wrong email or password.' } },
      },
    }
    vi.stubGlobal('fetch', fakeFetch(answers).fetch)
    const session = useSessionStore()

    expect(await session.signIn({ email: 'petra@example.org', password: 'nope' })).toBe(false)
    expect(session.signInError).toMatchObject({
      code: 'UNAUTHENTICATED',
      message: 'Wrong email or password.',
    })
    expect(session.user).toBeNull()

    answers['POST /api/v1/auth/login'] = { status: 200, body: { data: petraPi } }
    expect(await session.signIn({ email: 'petra@example.org', password: 'right' })).toBe(true)
    expect(session.signInError).toBeNull()
    expect(session.user?.email).toBe('petra@example.org')
  })

  it('signOut() forgets the user; a failure keeps the user and the error', async () => {
    const answers: Record<string, { status: number; body?: unknown }> = {
      'POST /api/v1/auth/logout': {
        status: 500,
        body: { error: { code: 'INTERNAL', message: 'Try later.' } },
      },
      'POST /api/v1/auth/login': { status: 200, body: { data: petraPi } },
    }
    vi.stubGlobal('fetch', fakeFetch(answers).fetch)
    const session = useSessionStore()
    await session.signIn({ email: 'petra@example.org', password: 'right' })

    expect(await session.signOut()).toBe(false)
    expect(session.user).not.toBeNull()
    expect(session.signOutError?.message).toBe('Try later.')

    answers['POST /api/v1/auth/logout'] = { status: 204 }
    expect(await session.signOut()).toBe(true)
    expect(session.user).toBeNull()
    expect(session.signOutError).toBeNull()
  })

  it('signOut() of an already expired session still counts as signed out', async () => {
    vi.stubGlobal(
      'fetch',
      fakeFetch({
        'POST /api/v1/auth/login': { status: 200, body: { data: petraPi } },
        'POST /api/v1/auth/logout': unauthenticated,
      }).fetch,
    )
    const session = useSessionStore()
    await session.signIn({ email: 'petra@example.org', password: 'right' })
    expect(await session.signOut()).toBe(true)
    expect(session.user).toBeNull()
  })
})
