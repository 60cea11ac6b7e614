import request from 'supertest'
import { afterAll, describe, expect, it } from 'vitest'
import { closeConnections, createTestApp, signIn } from '../support/api'
import { createLabWithTeam, createUser } from '../support/factories'

afterAll(closeConnections)

const app = createTestApp()

describe('GET /api/v1/admin/users', () => {
  it('answers 401 to anonymous callers', async () => {
    const res = await request(app).get('/api/v1/admin/users')
    expect(res.status).toBe(401)
    expect(res.body.error.code).toBe('UNAUTHENTICATED')
  })

  it('answers 403 FORBIDDEN to a scientist, and to a PI', async () => {
    const { scientist, pi } = await createLabWithTeam()
    for (const person of [scientist, pi]) {
      const cookie = await signIn(app, person.email, person.password)
      const res = await request(app).get('/api/v1/admin/users').set('Cookie', cookie)
      expect(res.status).toBe(403)
      expect(res.body.error.code).toBe('FORBIDDEN')
    }
  })

  it('lists people with their lab roles for an instance admin, without password hashes', async () => {
    const admin = await createUser({ isAdmin: true })
    const { lab, pi, scientist } = await createLabWithTeam()
    const cookie = await signIn(app, admin.email, admin.password)
    const res = await request(app).get('/api/v1/admin/users').set('Cookie', cookie)
    expect(res.status).toBe(200)
    const byId = new Map(res.body.data.map((u: { id: number }) => [u.id, u]))
    expect(byId.get(pi.id)).toEqual({
      id: pi.id,
      email: pi.email,
      name: pi.name,
      isAdmin: false,
      createdAt: expect.any(String),
      memberships: [{ labId: lab.id, labName: lab.name, role: 'pi' }],
    })
    expect(byId.get(scientist.id)).toMatchObject({ memberships: [{ labId: lab.id, role: 'scientist' }] })
    expect(byId.get(admin.id)).toMatchObject({ isAdmin: true, memberships: [] })
    expect(JSON.stringify(res.body)).not.toMatch(/scrypt|password/i)
  })
})
