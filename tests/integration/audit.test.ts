import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { db } from '../../server/db'
import { closeConnections, createTestApp, postLogin, signIn } from '../support/api'
import { asUser } from '../support/as-user'
import { createLabWithTeam, createUser, uniqueEmail, type TestUser } from '../support/factories'

const app = createTestApp({ loginRateLimit: 1000 })
afterAll(closeConnections)

async function as(user: TestUser) {
  return asUser(app, await signIn(app, user.email, user.password))
}

describe('the audit_events table', () => {
  let id: number
  beforeAll(async () => {
    const [row] = await db('audit_events')
      .insert({ action: 'lab.created', details: JSON.stringify({ probe: true }) })
      .returning('id')
    id = row.id
  })

  it('refuses UPDATE', async () => {
    await expect(db('audit_events').where({ id }).update({ action: 'member.removed' })).rejects.toThrow(
      /append-only \(UPDATE refused\)/,
    )
  })

  it('refuses DELETE', async () => {
    await expect(db('audit_events').where({ id }).delete()).rejects.toThrow(/append-only \(DELETE refused\)/)
  })

  it('refuses TRUNCATE', async () => {
    await expect(db.raw('TRUNCATE audit_events')).rejects.toThrow(/append-only \(TRUNCATE refused\)/)
    expect(await db('audit_events').where({ id }).first()).toMatchObject({ action: 'lab.created' })
  })
})

describe('sign-in and sign-out entries', () => {
  it('records a successful sign-in with request id and address, a failed one with the e-mail tried, and a sign-out', async () => {
    const person = await createUser()
    const failed = await postLogin(app, person.email, 'wrong password')
    expect(failed.status).toBe(401)
    const ok = await postLogin(app, person.email, person.password)
    const cookie = ok.headers['set-cookie'][0].split(';')[0]
    await asUser(app, cookie).post('/api/v1/auth/logout')

    const failedRow = await db('audit_events')
      .where({ action: 'auth.sign_in_failed' })
      .whereRaw("details->>'email' = ?", [person.email])
      .first()
    expect(failedRow).toMatchObject({ actor_user_id: null, request_id: failed.headers['x-request-id'] })
    expect(failedRow.ip).toMatch(/127\.0\.0\.1|::1/)
    const rows = await db('audit_events').where({ actor_user_id: person.id }).orderBy('id')
    expect(rows.map((r) => r.action)).toEqual(['auth.signed_in', 'auth.signed_out'])
    expect(rows[0].request_id).toBe(ok.headers['x-request-id'])
    expect(JSON.stringify(rows)).not.toContain(person.password)
  })
})

describe('GET /api/v1/labs/:labId/audit', () => {
  let team: Awaited<ReturnType<typeof createLabWithTeam>>
  let other: Awaited<ReturnType<typeof createLabWithTeam>>
  beforeAll(async () => {
    team = await createLabWithTeam()
    other = await createLabWithTeam()
    const pi = await as(team.pi)
    for (let i = 0; i < 3; i += 1)
      await pi.post(`/api/v1/labs/${team.lab.id}/invitations`, {
        email: uniqueEmail('audited'),
        role: 'scientist',
      })
    await pi.patch(`/api/v1/labs/${team.lab.id}/members/${team.scientist.id}`, { role: 'biostatistician' })
    await (
      await as(other.pi)
    ).post(`/api/v1/labs/${other.lab.id}/invitations`, { email: uniqueEmail('other'), role: 'scientist' })
  })

  it('shows the lab’s PI the lab’s entries only, newest first, with actor and lab', async () => {
    const res = await (await as(team.pi)).get(`/api/v1/labs/${team.lab.id}/audit`)
    expect(res.status).toBe(200)
    const { items, total } = res.body.data
    expect(total).toBe(4)
    expect(items.map((e: { action: string }) => e.action)).toEqual([
      'member.role_changed',
      'invitation.created',
      'invitation.created',
      'invitation.created',
    ])
    expect(items[0]).toMatchObject({
      actor: { id: team.pi.id, name: team.pi.name, email: team.pi.email },
      labId: team.lab.id,
      labName: team.lab.name,
      subjectType: 'user',
      subjectId: String(team.scientist.id),
      details: { from: 'scientist', to: 'biostatistician' },
    })
    expect(items[0].requestId).toEqual(expect.any(String))
  })

  it('filters by action and actor, and pages', async () => {
    const pi = await as(team.pi)
    const base = `/api/v1/labs/${team.lab.id}/audit`
    const byAction = await pi.get(`${base}?action=invitation.created&pageSize=2`)
    expect(byAction.body.data).toMatchObject({ total: 3, page: 1, pageSize: 2 })
    expect(byAction.body.data.items).toHaveLength(2)
    const second = await pi.get(`${base}?action=invitation.created&pageSize=2&page=2`)
    expect(second.body.data.items).toHaveLength(1)
    const ids = [...byAction.body.data.items, ...second.body.data.items].map((e: { id: number }) => e.id)
    expect(new Set(ids).size).toBe(3)

    expect((await pi.get(`${base}?actorId=${team.scientist.id}`)).body.data.total).toBe(0)
    expect((await pi.get(`${base}?actorId=${team.pi.id}`)).body.data.total).toBe(4)
    expect((await pi.get(`${base}?action=no.such.action`)).status).toBe(400)
  })

  it('filters by date range', async () => {
    const pi = await as(team.pi)
    const base = `/api/v1/labs/${team.lab.id}/audit`
    const future = new Date(Date.now() + 3_600_000).toISOString()
    const past = new Date(Date.now() - 3_600_000).toISOString()
    expect((await pi.get(`${base}?from=${encodeURIComponent(future)}`)).body.data.total).toBe(0)
    expect(
      (await pi.get(`${base}?from=${encodeURIComponent(past)}&to=${encodeURIComponent(future)}`)).body.data
        .total,
    ).toBe(4)
    expect((await pi.get(`${base}?to=${encodeURIComponent(past)}`)).body.data.total).toBe(0)
    expect(
      (await pi.get(`${base}?from=${encodeURIComponent(future)}&to=${encodeURIComponent(past)}`)).status,
    ).toBe(400)
  })

  it('is for the lab’s PIs and admins: 403 for other roles, 404 for other labs, 401 anonymous', async () => {
    const path = `/api/v1/labs/${team.lab.id}/audit`
    expect((await (await as(team.biostatistician)).get(path)).status).toBe(403)
    expect((await (await as(other.pi)).get(path)).status).toBe(404)
    expect((await asUser(app).get(path)).status).toBe(401)
    const admin = await createUser({ isAdmin: true })
    const res = await (await as(admin)).get(path)
    expect(res.status).toBe(200)
    expect(res.body.data.total).toBe(4)
    expect((await (await as(admin)).get('/api/v1/labs/999999999/audit')).status).toBe(404)
  })
})

describe('GET /api/v1/admin/audit', () => {
  it('shows admins every entry, including failed sign-ins, filterable by lab and action', async () => {
    const admin = await createUser({ isAdmin: true })
    const { lab, pi } = await createLabWithTeam()
    await (
      await as(pi)
    ).post(`/api/v1/labs/${lab.id}/invitations`, { email: uniqueEmail('admin-audit'), role: 'pi' })
    const email = uniqueEmail('nobody')
    await postLogin(app, email, 'whatever it is')

    const api = await as(admin)
    const failures = await api.get('/api/v1/admin/audit?action=auth.sign_in_failed&pageSize=200')
    expect(failures.status).toBe(200)
    expect(
      failures.body.data.items.some((e: { details: { email?: string } }) => e.details.email === email),
    ).toBe(true)
    const ofLab = await api.get(`/api/v1/admin/audit?labId=${lab.id}`)
    expect(ofLab.body.data.items.map((e: { action: string }) => e.action)).toEqual(['invitation.created'])
    expect((await (await as(pi)).get('/api/v1/admin/audit')).status).toBe(403)
  })
})
