import request from 'supertest'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { TOUCH_EVERY_MS } from '../../server/auth/session'
import { db } from '../../server/db'
import { closeConnections, createTestApp, signIn } from '../support/api'
import { createUser, type TestUser } from '../support/factories'

afterAll(closeConnections)

const app = createTestApp()
let user: TestUser
let cookie: string

beforeAll(async () => {
  user = await createUser()
  cookie = await signIn(app, user.email, user.password)
})

const me = () => request(app).get('/api/v1/auth/me').set('Cookie', cookie)

/** The stored session of the test user (its expiry and data). */
async function stored(): Promise<{ sid: string; expire: Date; sess: { touchedAt?: number } }> {
  const rows = await db('session').whereRaw(`(sess->'passport'->>'user')::int = ?`, [user.id])
  expect(rows).toHaveLength(1)
  return rows[0]
}

describe('the rolling session', () => {
  it('writes its expiry back at most every few minutes, not on every request', async () => {
    expect((await me()).status).toBe(200)
    const first = await stored()
    expect(first.sess.touchedAt).toBeGreaterThan(Date.now() - 60_000)
    // A mark no write of the app would leave: an expiry one hour ahead instead of twelve.
    await db('session')
      .where({ sid: first.sid })
      .update({ expire: db.raw(`now() + interval '1 hour'`) })
    const marked = (await stored()).expire
    for (let k = 0; k < 10; k++) expect((await me()).status).toBe(200)
    expect((await stored()).expire).toEqual(marked)
  })

  it('pushes the expiry forward once the last write is older than that', async () => {
    const before = await stored()
    const longAgo = Date.now() - TOUCH_EVERY_MS - 1000
    await db.raw(
      `UPDATE session SET sess = jsonb_set(sess::jsonb, '{touchedAt}', to_jsonb(?::bigint))::json WHERE sid = ?`,
      [longAgo, before.sid],
    )
    expect((await me()).status).toBe(200)
    const after = await stored()
    expect(after.expire.getTime()).toBeGreaterThan(before.expire.getTime() + 10 * 60 * 60 * 1000)
    expect(after.sess.touchedAt).toBeGreaterThan(longAgo)
  })

  it('still ends a session idle past its stored expiry', async () => {
    const { sid } = await stored()
    await db('session')
      .where({ sid })
      .update({ expire: db.raw(`now() - interval '1 second'`) })
    expect((await me()).status).toBe(401)
  })
})
