import request from 'supertest'
import { afterAll, describe, expect, it } from 'vitest'
import { createSessionStore } from '../../server/auth/session'
import { db } from '../../server/db'
import { softDeleteUser } from '../../server/repositories/users.repo'
import {
  appWriteHeaders,
  closeConnections,
  createTestApp,
  postLogin,
  sessionCookieFrom,
  signIn,
} from '../support/api'
import { createLab, createUser, uniqueEmail } from '../support/factories'

afterAll(closeConnections)

const app = createTestApp()

function sidOf(cookie: string): string {
  // Cookie value is "s:<sid>.<signature>", URL-encoded.
  return decodeURIComponent(cookie.split('=')[1]).slice(2).split('.')[0]
}

describe('POST /api/v1/auth/login', () => {
  it('answers 401 for a wrong password and sets no session cookie', async () => {
    const user = await createUser()
    const res = await postLogin(app, user.email, 'not-the-password')
    expect(res.status).toBe(401)
    expect(res.body.error.code).toBe('UNAUTHENTICATED')
    expect(res.headers['set-cookie']).toBeUndefined()
  })

  it('answers an unknown email exactly like a wrong password', async () => {
    const user = await createUser()
    const unknown = await postLogin(app, uniqueEmail('nobody'), 'whatever')
    const wrong = await postLogin(app, user.email, 'whatever')
    expect(unknown.status).toBe(401)
    expect(unknown.body).toEqual(wrong.body)
    expect(unknown.headers['set-cookie']).toBeUndefined()
  })

  it('signs in with the right password and returns the user with lab memberships', async () => {
    const lab = await createLab()
    const user = await createUser({ memberships: [{ lab, role: 'pi' }] })
    const res = await postLogin(app, user.email, user.password)
    expect(res.status).toBe(200)
    expect(res.body.data).toEqual({
      id: user.id,
      email: user.email,
      name: user.name,
      isAdmin: false,
      memberships: [{ labId: lab.id, labName: lab.name, role: 'pi' }],
    })
    expect(res.body.data).not.toHaveProperty('passwordHash')
  })

  it('sets an httpOnly, SameSite=Lax session cookie (not Secure while PUBLIC_URL is http)', async () => {
    const user = await createUser()
    const res = await postLogin(app, user.email, user.password)
    const header = (res.headers['set-cookie'] as unknown as string[]).find((c) =>
      c.startsWith('nestwise.sid='),
    )!
    expect(header).toMatch(/; HttpOnly/)
    expect(header).toMatch(/; SameSite=Lax/)
    expect(header).not.toMatch(/; Secure/)
  })

  it('stores the session in PostgreSQL', async () => {
    const user = await createUser()
    const cookie = await signIn(app, user.email, user.password)
    const row = await db('session')
      .where({ sid: sidOf(cookie) })
      .first()
    expect(row?.sess.passport.user).toBe(user.id)
  })

  it('matches the email case-insensitively and ignores surrounding spaces', async () => {
    const user = await createUser()
    const res = await postLogin(app, `  ${user.email.toUpperCase()} `, user.password)
    expect(res.status).toBe(200)
    expect(res.body.data.email).toBe(user.email)
  })

  it('issues a new session id at sign-in and ends the previous one (no session fixation)', async () => {
    const first = await createUser()
    const second = await createUser()
    const firstCookie = await signIn(app, first.email, first.password)
    const res = await postLogin(app, second.email, second.password, firstCookie)
    const secondCookie = sessionCookieFrom(res)!
    expect(res.status).toBe(200)
    expect(sidOf(secondCookie)).not.toBe(sidOf(firstCookie))
    expect((await request(app).get('/api/v1/auth/me').set('Cookie', firstCookie)).status).toBe(401)
    expect((await request(app).get('/api/v1/auth/me').set('Cookie', secondCookie)).body.data.id).toBe(
      second.id,
    )
  })

  it('rejects a deleted account even with the right password', async () => {
    const user = await createUser()
    await softDeleteUser(user.id)
    expect((await postLogin(app, user.email, user.password)).status).toBe(401)
  })

  it('answers 400 INVALID_PAYLOAD with one issue per bad field', async () => {
    const res = await request(app)
      .post('/api/v1/auth/login')
      .set(appWriteHeaders)
      .send({ email: 'not-an-email', password: '' })
    expect(res.status).toBe(400)
    expect(res.body.error.code).toBe('INVALID_PAYLOAD')
    const paths = res.body.error.details.issues.map((i: { path: string }) => i.path).sort()
    expect(paths).toEqual(['email', 'password'])
  })

  it('answers 400 for a body that is not JSON', async () => {
    const res = await request(app)
      .post('/api/v1/auth/login')
      .set(appWriteHeaders)
      .set('Content-Type', 'application/json')
      .send('{"email": "a@b.c", "password":')
    expect(res.status).toBe(400)
    expect(res.body.error.code).toBe('INVALID_PAYLOAD')
  })
})

describe('GET /api/v1/auth/me', () => {
  it('answers 401 UNAUTHENTICATED without a session', async () => {
    const res = await request(app).get('/api/v1/auth/me')
    expect(res.status).toBe(401)
    expect(res.body).toEqual({ error: { code: 'UNAUTHENTICATED', message: expect.any(String) } })
  })

  it('keeps the session across a server restart: a new app and store read it from PostgreSQL', async () => {
    const user = await createUser()
    const cookie = await signIn(app, user.email, user.password)
    const freshStore = createSessionStore({ pruneIntervalSeconds: false })
    try {
      const restarted = createTestApp({ sessionStore: freshStore })
      const res = await request(restarted).get('/api/v1/auth/me').set('Cookie', cookie)
      expect(res.status).toBe(200)
      expect(res.body.data.id).toBe(user.id)
    } finally {
      await freshStore.close()
    }
  })

  it('answers 401 for a cookie whose signature was tampered with', async () => {
    const user = await createUser()
    const cookie = await signIn(app, user.email, user.password)
    const last = cookie.at(-1)
    const tampered = cookie.slice(0, -1) + (last === 'A' ? 'B' : 'A')
    expect((await request(app).get('/api/v1/auth/me').set('Cookie', tampered)).status).toBe(401)
  })

  it('answers 401 for a real session id presented without its signature', async () => {
    const user = await createUser()
    const cookie = await signIn(app, user.email, user.password)
    const unsigned = `nestwise.sid=${sidOf(cookie)}`
    expect((await request(app).get('/api/v1/auth/me').set('Cookie', unsigned)).status).toBe(401)
  })

  it('answers 401 once the account has been deleted, even with a live session', async () => {
    const user = await createUser()
    const cookie = await signIn(app, user.email, user.password)
    await softDeleteUser(user.id)
    expect((await request(app).get('/api/v1/auth/me').set('Cookie', cookie)).status).toBe(401)
  })

  it('reflects a role change on the next request (memberships are read per request)', async () => {
    const lab = await createLab()
    const user = await createUser({ memberships: [{ lab, role: 'scientist' }] })
    const cookie = await signIn(app, user.email, user.password)
    await db('memberships').where({ user_id: user.id, lab_id: lab.id }).update({ role: 'pi' })
    const res = await request(app).get('/api/v1/auth/me').set('Cookie', cookie)
    expect(res.body.data.memberships).toEqual([{ labId: lab.id, labName: lab.name, role: 'pi' }])
  })
})

describe('POST /api/v1/auth/logout', () => {
  it('ends the session: 204, cookie cleared, row gone, old cookie no longer signs in', async () => {
    const user = await createUser()
    const cookie = await signIn(app, user.email, user.password)
    const res = await request(app).post('/api/v1/auth/logout').set(appWriteHeaders).set('Cookie', cookie)
    expect(res.status).toBe(204)
    const cleared = (res.headers['set-cookie'] as unknown as string[]).find((c) =>
      c.startsWith('nestwise.sid='),
    )!
    expect(cleared).toMatch(/Expires=Thu, 01 Jan 1970/)
    expect(
      await db('session')
        .where({ sid: sidOf(cookie) })
        .first(),
    ).toBeUndefined()
    expect((await request(app).get('/api/v1/auth/me').set('Cookie', cookie)).status).toBe(401)
  })

  it('is harmless without a session', async () => {
    const res = await request(app).post('/api/v1/auth/logout').set(appWriteHeaders)
    expect(res.status).toBe(204)
  })
})
