import request from 'supertest'
import { afterAll, describe, expect, it } from 'vitest'
import { parseTrustProxy } from '../../server/config'
import { db } from '../../server/db'
import { closeConnections, createTestApp, postLogin } from '../support/api'
import { createUser } from '../support/factories'

afterAll(closeConnections)

describe('sign-in rate limit', () => {
  it('answers 429 RATE_LIMITED after the allowed failures, even for the right password', async () => {
    const app = createTestApp({ loginRateLimit: 3 })
    const user = await createUser()
    for (let i = 0; i < 3; i += 1) {
      expect((await postLogin(app, user.email, `wrong-${i}`)).status).toBe(401)
    }
    const blocked = await postLogin(app, user.email, user.password)
    expect(blocked.status).toBe(429)
    expect(blocked.body.error.code).toBe('RATE_LIMITED')
    expect(Number(blocked.headers['retry-after'])).toBeGreaterThan(0)
    expect(blocked.headers['set-cookie']).toBeUndefined()
  })

  it('counts per email: another account from the same address can still try', async () => {
    const app = createTestApp({ loginRateLimit: 2 })
    const attacked = await createUser()
    const other = await createUser()
    await postLogin(app, attacked.email, 'wrong')
    await postLogin(app, attacked.email, 'wrong')
    expect((await postLogin(app, attacked.email, 'wrong')).status).toBe(429)
    expect((await postLogin(app, other.email, other.password)).status).toBe(200)
  })

  it('treats differently spelled forms of one email as the same account', async () => {
    const app = createTestApp({ loginRateLimit: 2 })
    const user = await createUser()
    await postLogin(app, user.email, 'wrong')
    await postLogin(app, user.email.toUpperCase(), 'wrong')
    expect((await postLogin(app, ` ${user.email} `, 'wrong')).status).toBe(429)
  })

  it('does not count successful sign-ins', async () => {
    const app = createTestApp({ loginRateLimit: 2 })
    const user = await createUser()
    for (let i = 0; i < 4; i += 1) {
      expect((await postLogin(app, user.email, user.password)).status).toBe(200)
    }
  })

  it('keeps a much higher ceiling per address: a spray of wrong guesses does not lock colleagues out', async () => {
    // One address over every account: 20 failures per 15 minutes at a limit of 1 (was 5, so a
    // probe from a shared address locked the demo PI out with the right password).
    const app = createTestApp({ loginRateLimit: 1 })
    const targets = await Promise.all(Array.from({ length: 21 }, () => createUser()))
    for (const target of targets.slice(0, 19)) {
      expect((await postLogin(app, target.email, 'guess')).status).toBe(401)
    }
    expect((await postLogin(app, targets[19].email, targets[19].password)).status).toBe(200)
    expect((await postLogin(app, targets[19].email, 'guess')).status).toBe(401)
    const res = await postLogin(app, targets[20].email, targets[20].password)
    expect(res.status).toBe(429)
    expect(res.body.error.code).toBe('RATE_LIMITED')
  })

  it('leaves other routes alone', async () => {
    const app = createTestApp({ loginRateLimit: 1 })
    const user = await createUser()
    await postLogin(app, user.email, 'wrong')
    expect((await postLogin(app, user.email, 'wrong')).status).toBe(429)
    expect((await request(app).get('/api/v1/auth/me')).status).toBe(401)
  })
})

describe('behind a reverse proxy (TRUST_PROXY)', () => {
  const from = (address: string) => ({ 'X-Forwarded-For': address })

  it('ignores X-Forwarded-For unless told to trust the proxy, so a client cannot pick a fresh address', async () => {
    const app = createTestApp({ loginRateLimit: 1 })
    const user = await createUser()
    expect((await postLogin(app, user.email, 'wrong').set(from('203.0.113.1'))).status).toBe(401)
    expect((await postLogin(app, user.email, 'wrong').set(from('203.0.113.2'))).status).toBe(429)
  })

  it('counts per forwarded client when the proxy is trusted, and per account over all of them', async () => {
    const app = createTestApp({ loginRateLimit: 2, trustProxy: ['loopback'] })
    const user = await createUser()
    // Two failures from one client close that client and account…
    for (let k = 0; k < 2; k++)
      expect((await postLogin(app, user.email, 'x').set(from('203.0.113.10'))).status).toBe(401)
    expect((await postLogin(app, user.email, user.password).set(from('203.0.113.10'))).status).toBe(429)
    // …while the owner, at another address, still signs in.
    expect((await postLogin(app, user.email, user.password).set(from('198.51.100.7'))).status).toBe(200)
    // Guesses spread over addresses: the account closes after three times the limit in all.
    for (const address of ['203.0.113.11', '203.0.113.12']) {
      for (let k = 0; k < 2; k++)
        expect((await postLogin(app, user.email, 'x').set(from(address))).status).toBe(401)
    }
    expect((await postLogin(app, user.email, user.password).set(from('198.51.100.8'))).status).toBe(429)
  })

  it('writes the forwarded client address into the audit log', async () => {
    const app = createTestApp({ trustProxy: ['loopback'] })
    const user = await createUser()
    expect((await postLogin(app, user.email, user.password).set(from('192.0.2.44'))).status).toBe(200)
    const row = await db('audit_events').where({ action: 'auth.signed_in', actor_user_id: user.id }).first()
    expect(row.ip).toBe('192.0.2.44')
  })
})

describe('TRUST_PROXY', () => {
  it('reads false, hop counts and lists of addresses or subnets; unset trusts loopback only behind https', () => {
    expect(parseTrustProxy(undefined, false)).toBe(false)
    expect(parseTrustProxy(undefined, true)).toEqual(['loopback'])
    expect(parseTrustProxy('false', true)).toBe(false)
    expect(parseTrustProxy('1', false)).toBe(1)
    expect(parseTrustProxy('loopback, 10.0.0.0/8', false)).toEqual(['loopback', '10.0.0.0/8'])
  })
})
