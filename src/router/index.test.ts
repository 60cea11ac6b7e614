// @vitest-environment happy-dom
import { createPinia, setActivePinia } from 'pinia'
import { createMemoryHistory } from 'vue-router'
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest'
import { fakeFetch } from '@/testing/fake-fetch'
import { orlaAdmin, petraPi, samiScientist } from '@/testing/users'
import type { CurrentUser } from '../../shared/schemas/auth'
import { createAppRouter } from './index'
import { routes } from './routes'

const Blank = { render: () => null }
const testRoutes = [{ path: '/people', name: 'people', component: Blank, meta: { admin: true } }, ...routes]

function signedInAs(user: CurrentUser | null) {
  vi.stubGlobal(
    'fetch',
    fakeFetch({
      'GET /api/v1/auth/session': user
        ? { status: 200, body: { data: user } }
        : { status: 401, body: { error: { code: 'UNAUTHENTICATED', message: 'Sign in first.' } } },
    }).fetch,
  )
  return createAppRouter(createMemoryHistory(), testRoutes)
}

beforeEach(() => setActivePinia(createPinia()))
afterEach(() => vi.unstubAllGlobals())

describe('route guard', () => {
  it('sends an anonymous visitor to sign-in and remembers where they were going', async () => {
    const router = signedInAs(null)
    await router.push('/lab/board?week=3')
    expect(router.currentRoute.value.name).toBe('sign-in')
    expect(router.currentRoute.value.query.redirect).toBe('/lab/board?week=3')
  })

  it('adds no redirect for the overview itself', async () => {
    const router = signedInAs(null)
    await router.push('/')
    expect(router.currentRoute.value.fullPath).toBe('/sign-in')
  })

  it('lets a signed-in person with the right role through', async () => {
    const router = signedInAs(petraPi)
    await router.push('/lab/board')
    expect(router.currentRoute.value.name).toBe('lab-board')
    expect(document.title).toBe('Lab board · Nestwise')
  })

  it('shows "not available" for the wrong role, naming the refused page', async () => {
    const router = signedInAs(samiScientist)
    await router.push('/lab/board')
    expect(router.currentRoute.value.name).toBe('not-available')
    expect(router.currentRoute.value.query.page).toBe('/lab/board')
  })

  it('keeps admin pages for admins', async () => {
    const admin = signedInAs(orlaAdmin)
    await admin.push('/people')
    expect(admin.currentRoute.value.name).toBe('people')

    setActivePinia(createPinia())
    const pi = signedInAs(petraPi)
    await pi.push('/people')
    expect(pi.currentRoute.value.name).toBe('not-available')
  })

  it('sends a signed-in person away from the sign-in page to the requested page', async () => {
    const router = signedInAs(petraPi)
    await router.push('/sign-in?redirect=/lab/board')
    expect(router.currentRoute.value.name).toBe('lab-board')
  })

  it('shows the not-found page for unknown paths, with a page title', async () => {
    const router = signedInAs(petraPi)
    await router.push('/no/such/page')
    expect(router.currentRoute.value.name).toBe('not-found')
    expect(document.title).toBe('Page not found · Nestwise')
  })
})
