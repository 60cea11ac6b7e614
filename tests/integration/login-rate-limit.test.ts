import request from 'supertest'
import { afterAll, describe, expect, it } from 'vitest'
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

  it('also limits one address spraying many emails (five times the per-account limit)', async () => {
    const app = createTestApp({ loginRateLimit: 1 })
    const targets = await Promise.all(Array.from({ length: 6 }, () => createUser()))
    for (const target of targets.slice(0, 5)) {
      expect((await postLogin(app, target.email, 'guess')).status).toBe(401)
    }
    const res = await postLogin(app, targets[5].email, 'guess')
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
