import request from 'supertest'
import { afterAll, describe, expect, it } from 'vitest'
import { publicUrl } from '../../server/config'
import { hostName } from '../../server/middleware/allowed-hosts'
import { closeConnections, createTestApp, sessionCookieFrom, signIn } from '../support/api'
import { createUser } from '../support/factories'

afterAll(closeConnections)

const app = createTestApp()

function login(email: string, password: string) {
  return request(app).post('/api/v1/auth/login').send({ email, password })
}

describe('cross-site request defence on writes', () => {
  it('refuses a POST from another origin with 403 and does not sign in', async () => {
    const user = await createUser()
    const res = await login(user.email, user.password)
      .set('Origin', 'https://evil.example')
      .set('X-Requested-With', 'nestwise')
    expect(res.status).toBe(403)
    expect(res.body.error.code).toBe('FORBIDDEN')
    expect(sessionCookieFrom(res)).toBeUndefined()
  })

  it('refuses a write that names no origin at all', async () => {
    const user = await createUser()
    const res = await login(user.email, user.password).set('X-Requested-With', 'nestwise')
    expect(res.status).toBe(403)
  })

  it('refuses a same-origin write without the X-Requested-With header (a plain HTML form)', async () => {
    const user = await createUser()
    const res = await login(user.email, user.password).set('Origin', publicUrl)
    expect(res.status).toBe(403)
    expect(res.body.error.details.reason).toMatch(/X-Requested-With/)
  })

  it('accepts the public URL as origin', async () => {
    const user = await createUser()
    const res = await login(user.email, user.password)
      .set('Origin', publicUrl)
      .set('X-Requested-With', 'nestwise')
    expect(res.status).toBe(200)
  })

  it('accepts the origin the request was addressed to when its Host is one of ours (ALLOWED_HOSTS), e.g. behind the Vite dev proxy', async () => {
    const named = createTestApp({ allowedHosts: ['lab-pc.nestwise.test'] })
    const user = await createUser()
    const res = await request(named)
      .post('/api/v1/auth/login')
      .send({ email: user.email, password: user.password })
      .set('Host', 'lab-pc.nestwise.test:5173')
      .set('Origin', 'http://lab-pc.nestwise.test:5173')
      .set('X-Requested-With', 'nestwise')
    expect(res.status).toBe(200)
  })

  it('does not take a Host it does not know as its own origin: 421, nothing signed in', async () => {
    const user = await createUser()
    const res = await login(user.email, user.password)
      .set('Host', 'rebound.evil.example')
      .set('Origin', 'http://rebound.evil.example')
      .set('X-Requested-With', 'nestwise')
    expect(res.status).toBe(421)
    expect(res.body.error.code).toBe('MISDIRECTED_REQUEST')
    expect(sessionCookieFrom(res)).toBeUndefined()
  })

  it('falls back to the Referer when a browser sends no Origin', async () => {
    const user = await createUser()
    const ok = await login(user.email, user.password)
      .set('Referer', `${publicUrl}/sign-in?next=%2F`)
      .set('X-Requested-With', 'nestwise')
    expect(ok.status).toBe(200)
    const bad = await login(user.email, user.password)
      .set('Referer', 'https://evil.example/page')
      .set('X-Requested-With', 'nestwise')
    expect(bad.status).toBe(403)
  })

  it('refuses an opaque "null" origin (sandboxed frames, data: pages)', async () => {
    const user = await createUser()
    const res = await login(user.email, user.password)
      .set('Origin', 'null')
      .set('X-Requested-With', 'nestwise')
    expect(res.status).toBe(403)
  })

  it('protects sign-out too, so another site cannot end a session', async () => {
    const user = await createUser()
    const cookie = await signIn(app, user.email, user.password)
    const res = await request(app)
      .post('/api/v1/auth/logout')
      .set('Cookie', cookie)
      .set('Origin', 'https://evil.example')
    expect(res.status).toBe(403)
    expect((await request(app).get('/api/v1/auth/me').set('Cookie', cookie)).status).toBe(200)
  })

  it('leaves reads alone', async () => {
    const user = await createUser()
    const cookie = await signIn(app, user.email, user.password)
    const res = await request(app)
      .get('/api/v1/auth/me')
      .set('Cookie', cookie)
      .set('Origin', 'https://elsewhere.example')
    expect(res.status).toBe(200)
  })
})

describe('the Host allow-list', () => {
  it('answers reads only for our own names and for addresses', async () => {
    expect((await request(app).get('/api/v1/auth/me').set('Host', 'rebound.evil.example')).status).toBe(421)
    expect((await request(app).get('/api/v1/auth/me').set('Host', 'localhost:5173')).status).toBe(401)
    expect((await request(app).get('/api/v1/auth/me').set('Host', '192.168.1.20:3000')).status).toBe(401)
    expect((await request(app).get('/api/v1/auth/me').set('Host', '[::1]:3000')).status).toBe(401)
    expect((await request(app).get('/api/v1/auth/me').set('Host', new URL(publicUrl).host)).status).toBe(401)
  })

  it('lets the health route answer any name, for load balancers probing by an internal one', async () => {
    expect((await request(app).get('/api/health').set('Host', 'nestwise-internal')).status).toBe(200)
  })
})

describe('hostName', () => {
  it('drops the port and the brackets of an IPv6 address', () => {
    expect(hostName('Lab-PC.example:5173')).toBe('lab-pc.example')
    expect(hostName('[::1]:3000')).toBe('::1')
    expect(hostName('127.0.0.1')).toBe('127.0.0.1')
    expect(hostName(undefined)).toBe('')
  })
})
