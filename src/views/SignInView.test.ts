// @vitest-environment happy-dom
import { flushPromises } from '@vue/test-utils'
import { afterEach, describe, expect, it, vi } from 'vitest'
import { fakeFetch } from '@/testing/fake-fetch'
import { mountWithApp } from '@/testing/mount-with-app'
import { settle } from '@/testing/settle'
import { samiScientist } from '@/testing/users'
import SignInView from './SignInView.vue'

const anonymous = { status: 401, body: { error: { code: 'UNAUTHENTICATED', message: 'Sign in first.' } } }

afterEach(() => {
  vi.unstubAllGlobals()
  document.body.innerHTML = ''
})

async function fillAndSubmit(
  wrapper: Awaited<ReturnType<typeof mountWithApp>>['wrapper'],
  email: string,
  password: string,
) {
  await wrapper.find('input[type="email"]').setValue(email)
  await wrapper.find('input[autocomplete="current-password"]').setValue(password)
  await wrapper.find('form').trigger('submit')
  // Vuetify validates asynchronously before the submit handler continues.
  await settle()
}

describe('SignInView', () => {
  it('shows the message the API gives for a wrong password, and clears the password field', async () => {
    vi.stubGlobal(
      'fetch',
      fakeFetch({
        'GET /api/v1/auth/session': anonymous,
        'POST /api/v1/auth/login': {
          status: 401,
          body: { error: { code: 'UNAUTHENTICATED', message: 'Wrong email or password.' } },
        },
      }).fetch,
    )
    const { wrapper } = await mountWithApp(SignInView, { path: '/sign-in' })

    await fillAndSubmit(wrapper, 'sami@example.org', 'not-it')

    const notice = wrapper.find('[data-testid="error-notice"]')
    expect(notice.text()).toContain('Sign-in failed')
    expect(notice.text()).toContain('Wrong email or password.')
    expect((wrapper.find('input[autocomplete="current-password"]').element as HTMLInputElement).value).toBe(
      '',
    )
  })

  it('explains rate limiting in the words the server sent', async () => {
    vi.stubGlobal(
      'fetch',
      fakeFetch({
        'GET /api/v1/auth/session': anonymous,
        'POST /api/v1/auth/login': {
          status: 429,
          body: { error: { code: 'RATE_LIMITED', message: 'Too many sign-in attempts. Wait 15 minutes.' } },
        },
      }).fetch,
    )
    const { wrapper } = await mountWithApp(SignInView, { path: '/sign-in' })

    await fillAndSubmit(wrapper, 'sami@example.org', 'again')

    expect(wrapper.find('[data-testid="error-notice"]').text()).toContain('Too many attempts')
    expect(wrapper.find('[data-testid="error-notice"]').text()).toContain('Wait 15 minutes.')
  })

  it('does not call the API when the fields are empty', async () => {
    const fake = fakeFetch({ 'GET /api/v1/auth/session': anonymous })
    vi.stubGlobal('fetch', fake.fetch)
    const { wrapper } = await mountWithApp(SignInView, { path: '/sign-in' })

    await wrapper.find('form').trigger('submit')
    await new Promise((resolve) => setTimeout(resolve, 0))
    await flushPromises()

    expect(fake.calls.map((c) => c.method)).toEqual(['GET'])
    expect(wrapper.text()).toContain('Enter your email address.')
    expect(wrapper.text()).toContain('Enter your password.')
  })

  it('goes back to the requested page after signing in', async () => {
    const fake = fakeFetch({
      'GET /api/v1/auth/session': anonymous,
      'POST /api/v1/auth/login': { status: 200, body: { data: samiScientist } },
    })
    vi.stubGlobal('fetch', fake.fetch)
    const { wrapper, router } = await mountWithApp(SignInView, { path: '/sign-in?redirect=/not-available' })

    await fillAndSubmit(wrapper, '  sami@example.org ', 'nestwise-demo')

    expect(JSON.parse(String(fake.calls[1]!.init.body))).toEqual({
      email: 'sami@example.org',
      password: 'nestwise-demo',
    })
    // The target view is loaded on demand, so the navigation finishes a little later.
    await vi.waitFor(() => expect(router.currentRoute.value.fullPath).toBe('/not-available'))
  })

  it('offers to ask again when the server could not be reached', async () => {
    vi.stubGlobal(
      'fetch',
      fakeFetch({
        'GET /api/v1/auth/session': {
          status: 503,
          body: { error: { code: 'INTERNAL', message: 'Database unavailable.' } },
        },
      }).fetch,
    )
    const { wrapper } = await mountWithApp(SignInView, { path: '/sign-in' })

    const notice = wrapper.find('[data-testid="error-notice"]')
    expect(notice.text()).toContain('Could not check whether you are signed in')
    expect(notice.text()).toContain('Database unavailable.')
    expect(notice.find('button').text()).toBe('Try again')
  })
})
