import { afterEach, describe, expect, it, vi } from 'vitest'
import { fakeFetch } from '@/testing/fake-fetch'
import { ApiError, asApiError, request, setUnauthenticatedHandler } from './http'

/** The ApiError a request rejected with; a request that succeeds fails the test. */
function failureOf(pending: Promise<unknown>): Promise<ApiError> {
  return pending.then(
    () => {
      throw new Error('expected the request to fail')
    },
    (error: ApiError) => error,
  )
}

afterEach(() => {
  vi.unstubAllGlobals()
  setUnauthenticatedHandler(null)
})

describe('request', () => {
  it('returns the data member of a success answer and sends the CSRF header on every call', async () => {
    const fake = fakeFetch({ 'GET /api/v1/things': { status: 200, body: { data: { n: 3 } } } })
    vi.stubGlobal('fetch', fake.fetch)

    await expect(request('/api/v1/things')).resolves.toEqual({ n: 3 })
    const headers = fake.calls[0]!.init.headers as Record<string, string>
    expect(headers['X-Requested-With']).toBe('nestwise')
    expect(fake.calls[0]!.init.credentials).toBe('same-origin')
  })

  it('sends a JSON body on writes', async () => {
    const fake = fakeFetch({ 'POST /api/v1/things': { status: 201, body: { data: { id: 1 } } } })
    vi.stubGlobal('fetch', fake.fetch)

    await request('/api/v1/things', { method: 'POST', body: { name: 'x' } })
    const init = fake.calls[0]!.init
    expect(init.body).toBe('{"name":"x"}')
    expect((init.headers as Record<string, string>)['Content-Type']).toBe('application/json')
  })

  it('returns undefined for 204 No Content', async () => {
    vi.stubGlobal('fetch', fakeFetch({ 'POST /api/v1/auth/logout': { status: 204 } }).fetch)
    await expect(request('/api/v1/auth/logout', { method: 'POST' })).resolves.toBeUndefined()
  })

  it('turns the API error shape into an ApiError with code, message, details and Retry-After', async () => {
    vi.stubGlobal(
      'fetch',
      fakeFetch({
        'POST /api/v1/auth/login': {
          status: 429,
          body: { error: { code: 'RATE_LIMITED', message: 'Too many sign-in attempts.', details: { a: 1 } } },
          headers: { 'Retry-After': '600' },
        },
      }).fetch,
    )

    const error = await failureOf(request('/api/v1/auth/login', { method: 'POST', body: {} }))
    expect(error).toBeInstanceOf(ApiError)
    expect(error).toMatchObject({
      status: 429,
      code: 'RATE_LIMITED',
      message: 'Too many sign-in attempts.',
      details: { a: 1 },
      retryAfterSeconds: 600,
    })
  })

  it('falls back to a plain message by status when the body is not our error shape', async () => {
    vi.stubGlobal('fetch', async () => new Response('<html>Bad gateway</html>', { status: 502 }))
    const error = await failureOf(request('/api/v1/things'))
    expect(error).toMatchObject({ status: 502, code: 'INTERNAL' })
    expect(error.message).toContain('HTTP 502')
  })

  it('reports a network failure as status 0 with a message a person can act on', async () => {
    vi.stubGlobal('fetch', async () => {
      throw new TypeError('Failed to fetch')
    })
    const error = await failureOf(request('/api/v1/things'))
    expect(error).toMatchObject({ status: 0, code: 'NETWORK' })
    expect(error.message).toMatch(/could not reach/i)
  })

  it('calls the unauthenticated handler on 401 unless the caller opted out', async () => {
    vi.stubGlobal(
      'fetch',
      fakeFetch({
        'GET /api/v1/things': {
          status: 401,
          body: { error: { code: 'UNAUTHENTICATED', message: 'Sign in first.' } },
        },
      }).fetch,
    )
    const handler = vi.fn()
    setUnauthenticatedHandler(handler)

    await request('/api/v1/things').catch(() => undefined)
    expect(handler).toHaveBeenCalledTimes(1)
    await request('/api/v1/things', { skipUnauthenticatedHandler: true }).catch(() => undefined)
    expect(handler).toHaveBeenCalledTimes(1)
  })
})

describe('asApiError', () => {
  it('keeps ApiErrors and wraps anything else', () => {
    const original = new ApiError({ status: 404, code: 'NOT_FOUND', message: 'gone' })
    expect(asApiError(original)).toBe(original)
    expect(asApiError(new Error('boom'))).toMatchObject({ status: 0, code: 'CLIENT', message: 'boom' })
  })
})

describe('isRetryable', () => {
  it('offers a retry for no answer, timeouts, conflicts and server failures, not for a request that is wrong', async () => {
    const { isRetryable } = await import('./http')
    expect([0, 408, 409, 429, 500, 503].map((status) => isRetryable({ status }))).toEqual([
      true,
      true,
      true,
      true,
      true,
      true,
    ])
    expect([400, 401, 403, 404, 422].map((status) => isRetryable({ status }))).toEqual([
      false,
      false,
      false,
      false,
      false,
    ])
  })
})
