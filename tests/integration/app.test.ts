import { mkdtempSync, mkdirSync, rmSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import session from 'express-session'
import request from 'supertest'
import { afterAll, describe, expect, it, vi } from 'vitest'
import { logger } from '../../server/logger'
import { closeConnections, createTestApp, signIn } from '../support/api'
import { createUser } from '../support/factories'

const clientDir = mkdtempSync(join(tmpdir(), 'nestwise-client-'))
mkdirSync(join(clientDir, 'assets'))
writeFileSync(
  join(clientDir, 'index.html'),
  '<!doctype html><title>Nestwise test shell</title><div id="app"></div>',
)
writeFileSync(join(clientDir, 'assets', 'main-abc123.js'), 'console.log("app")')

afterAll(async () => {
  rmSync(clientDir, { recursive: true, force: true })
  await closeConnections()
})

const app = createTestApp({ clientDir })

describe('request ids', () => {
  it('puts an X-Request-Id on every response, errors included', async () => {
    for (const path of ['/api/health', '/api/v1/auth/me', '/api/v1/nothing', '/some/page']) {
      const res = await request(app).get(path)
      expect(res.headers['x-request-id'], path).toMatch(/^[0-9a-f-]{36}$/)
    }
  })

  it('keeps a well-formed incoming request id and replaces a suspicious one', async () => {
    const kept = await request(app).get('/api/health').set('X-Request-Id', 'proxy-id-0001')
    expect(kept.headers['x-request-id']).toBe('proxy-id-0001')
    const replaced = await request(app).get('/api/health').set('X-Request-Id', 'bad id\twith spaces')
    expect(replaced.headers['x-request-id']).toMatch(/^[0-9a-f-]{36}$/)
  })
})

describe('security headers', () => {
  it('sends a Content-Security-Policy that allows only our own scripts and no framing', async () => {
    const res = await request(app).get('/')
    const csp = res.headers['content-security-policy']
    expect(csp).toContain("default-src 'self'")
    expect(csp).toContain("script-src 'self'")
    expect(csp).toContain("img-src 'self' data:")
    expect(csp).toContain("frame-ancestors 'none'")
    expect(csp).not.toContain('upgrade-insecure-requests')
    expect(res.headers['x-content-type-options']).toBe('nosniff')
    expect(res.headers['x-powered-by']).toBeUndefined()
  })
})

describe('unknown paths and the built client', () => {
  it('answers unknown API paths with 404 NOT_FOUND JSON, never the app shell', async () => {
    for (const path of ['/api/v1/nothing-here', '/api/v2/labs', '/api']) {
      const res = await request(app).get(path)
      expect(res.status, path).toBe(404)
      expect(res.body.error.code, path).toBe('NOT_FOUND')
    }
    const post = await request(app)
      .post('/api/v1/nothing-here')
      .set('Origin', 'http://127.0.0.1:3000')
      .set('X-Requested-With', 'nestwise')
    expect(post.status).toBe(404)
  })

  it('serves index.html for client routes (SPA fallback) without caching it', async () => {
    for (const path of ['/', '/sign-in', '/datasets/42/analysis']) {
      const res = await request(app).get(path)
      expect(res.status, path).toBe(200)
      expect(res.text, path).toContain('Nestwise test shell')
      expect(res.headers['cache-control'], path).toBe('no-cache')
    }
  })

  it('serves hashed assets with a long cache lifetime', async () => {
    const res = await request(app).get('/assets/main-abc123.js')
    expect(res.status).toBe(200)
    expect(res.headers['cache-control']).toContain('immutable')
  })

  it('answers 404 for a missing file instead of the app shell', async () => {
    const res = await request(app).get('/assets/missing-file.js')
    expect(res.status).toBe(404)
  })

  it('without a built client, non-API paths answer 404 JSON', async () => {
    const res = await request(createTestApp()).get('/sign-in')
    expect(res.status).toBe(404)
    expect(res.body.error.code).toBe('NOT_FOUND')
  })
})

describe('server faults', () => {
  it('answers 500 INTERNAL with the request id and no internals', async () => {
    const user = await createUser()
    const cookie = await signIn(app, user.email, user.password)
    // A session store that fails the way a lost database connection would.
    class BrokenStore extends session.Store {
      get(_sid: string, callback: (err: unknown) => void) {
        callback(new Error('secret internals: connection terminated'))
      }
      set(_sid: string, _session: session.SessionData, callback?: (err?: unknown) => void) {
        callback?.()
      }
      destroy(_sid: string, callback?: (err?: unknown) => void) {
        callback?.()
      }
    }
    const broken = createTestApp({ sessionStore: new BrokenStore() })
    const logged = vi.spyOn(logger, 'error').mockImplementation(() => {})
    const res = await request(broken).get('/api/v1/auth/me').set('Cookie', cookie)
    // The fault is logged with the same request id the client can quote.
    const logCalls = logged.mock.calls.slice()
    logged.mockRestore()
    expect(res.status).toBe(500)
    expect(logCalls).toContainEqual([
      'request failed',
      expect.objectContaining({ requestId: res.headers['x-request-id'] }),
    ])
    expect(res.body).toEqual({
      error: {
        code: 'INTERNAL',
        message: expect.any(String),
        details: { requestId: res.headers['x-request-id'] },
      },
    })
    expect(res.text).not.toMatch(/secret internals|at .*\.ts/)
  })
})
