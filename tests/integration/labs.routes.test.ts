import request from 'supertest'
import { afterAll, describe, expect, it } from 'vitest'
import { closeConnections, createTestApp, signIn } from '../support/api'
import { createLab, createLabWithTeam, createUser } from '../support/factories'

afterAll(closeConnections)

const app = createTestApp()

async function getAs(email: string, password: string, path: string) {
  const cookie = await signIn(app, email, password)
  return request(app).get(path).set('Cookie', cookie)
}

describe('GET /api/v1/labs', () => {
  it('answers 401 to anonymous callers', async () => {
    expect((await request(app).get('/api/v1/labs')).status).toBe(401)
  })

  it('lists only the labs a member belongs to, with their role and the member count', async () => {
    const { lab, scientist } = await createLabWithTeam()
    const second = await createLab()
    const other = await createLab()
    await createUser({ memberships: [{ lab: other, role: 'pi' }] })
    const user = await createUser({
      memberships: [
        { lab, role: 'biostatistician' },
        { lab: second, role: 'pi' },
      ],
    })

    const res = await getAs(user.email, user.password, '/api/v1/labs')
    expect(res.status).toBe(200)
    expect(res.body.data).toEqual(
      [
        { id: lab.id, name: lab.name, slug: lab.slug, memberCount: 4, myRole: 'biostatistician' },
        { id: second.id, name: second.name, slug: second.slug, memberCount: 1, myRole: 'pi' },
      ].sort((a, b) => (a.name < b.name ? -1 : 1)),
    )
    const scientistView = await getAs(scientist.email, scientist.password, '/api/v1/labs')
    expect(scientistView.body.data.map((l: { id: number }) => l.id)).toEqual([lab.id])
  })

  it('shows an instance admin every lab, with myRole null where they are not a member', async () => {
    const { lab } = await createLabWithTeam()
    const admin = await createUser({ isAdmin: true })
    const res = await getAs(admin.email, admin.password, '/api/v1/labs')
    expect(res.status).toBe(200)
    expect(res.body.data).toContainEqual({
      id: lab.id,
      name: lab.name,
      slug: lab.slug,
      memberCount: 3,
      myRole: null,
    })
  })

  it('answers a user without labs with an empty list', async () => {
    const loner = await createUser()
    const res = await getAs(loner.email, loner.password, '/api/v1/labs')
    expect(res.body).toEqual({ data: [] })
  })
})

describe('GET /api/v1/labs/:labId/members', () => {
  it('lists the members for anyone in the lab', async () => {
    const { lab, pi, scientist, biostatistician } = await createLabWithTeam()
    const res = await getAs(scientist.email, scientist.password, `/api/v1/labs/${lab.id}/members`)
    expect(res.status).toBe(200)
    expect(res.body.data.map((m: { userId: number; role: string }) => [m.userId, m.role]).sort()).toEqual(
      [
        [pi.id, 'pi'],
        [scientist.id, 'scientist'],
        [biostatistician.id, 'biostatistician'],
      ].sort(),
    )
  })

  it('answers 404 for a lab the user is not in, so other labs stay invisible', async () => {
    const { lab } = await createLabWithTeam()
    const outsider = await createUser()
    const res = await getAs(outsider.email, outsider.password, `/api/v1/labs/${lab.id}/members`)
    expect(res.status).toBe(404)
    expect(res.body.error.code).toBe('NOT_FOUND')
  })

  it('lets an instance admin see any lab, and answers 404 for one that does not exist', async () => {
    const { lab } = await createLabWithTeam()
    const admin = await createUser({ isAdmin: true })
    const cookie = await signIn(app, admin.email, admin.password)
    expect(
      (await request(app).get(`/api/v1/labs/${lab.id}/members`).set('Cookie', cookie)).body.data,
    ).toHaveLength(3)
    expect((await request(app).get('/api/v1/labs/999999999/members').set('Cookie', cookie)).status).toBe(404)
  })

  it('answers 400 with the parameter path for an id that is not a number', async () => {
    const user = await createUser()
    const res = await getAs(user.email, user.password, '/api/v1/labs/first/members')
    expect(res.status).toBe(400)
    expect(res.body.error.details.issues[0].path).toBe('params.labId')
  })
})
