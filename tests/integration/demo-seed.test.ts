import request from 'supertest'
import { afterAll, describe, expect, it } from 'vitest'
import { db } from '../../server/db'
import { seed } from '../../seeds/01-demo-people'
import { demoAccounts, demoPassword } from '../../seeds/data/demo-accounts'
import { closeConnections, createTestApp, signIn } from '../support/api'

afterAll(closeConnections)

async function demoRoles() {
  return db('users as u')
    .leftJoin('memberships as m', 'm.user_id', 'u.id')
    .leftJoin('labs as l', 'l.id', 'm.lab_id')
    .whereIn(
      'u.email',
      demoAccounts.map((a) => a.email),
    )
    .select('u.id', 'u.email', 'u.is_admin', 'l.slug', 'm.role')
    .orderBy(['u.email', 'l.slug'])
}

describe('demo seed', () => {
  it('creates the demo people and roles, and a second run restores what was edited without duplicating anything', async () => {
    await seed(db)
    const first = await demoRoles()
    expect(first.filter((r) => r.is_admin).map((r) => r.email)).toEqual(['orla@example.org'])
    expect(first.filter((r) => r.email === 'bea@example.org').map((r) => [r.slug, r.role])).toEqual([
      ['fernhill-culture-lab', 'biostatistician'],
      ['nimbus-neurite-lab', 'biostatistician'],
    ])
    expect(
      first
        .filter((r) => r.role === 'pi')
        .map((r) => r.email)
        .sort(),
    ).toEqual(['hugo@example.org', 'petra@example.org'])

    // Someone plays with the demo: a role changes and an account is deleted. Seeding again restores both.
    await db('memberships')
      .where({ user_id: first.find((r) => r.email === 'sami@example.org')!.id })
      .update({ role: 'pi' })
    await db('users').where({ email: 'theo@example.org' }).update({ deleted_at: db.fn.now() })
    await seed(db)
    expect(await demoRoles()).toEqual(first)
    expect(
      await db('users').where({ email: 'theo@example.org' }).whereNull('deleted_at').first(),
    ).toBeDefined()
    expect(
      await db('labs')
        .whereIn('slug', ['nimbus-neurite-lab', 'fernhill-culture-lab'])
        .count('* as n')
        .first(),
    ).toEqual({ n: 2 })

    // The restored account signs in with the demo password.
    const app = createTestApp()
    const cookie = await signIn(app, 'theo@example.org', demoPassword)
    const me = await request(app).get('/api/v1/auth/me').set('Cookie', cookie)
    expect(me.body.data).toMatchObject({
      name: 'Theo Lark',
      memberships: [{ labName: 'Nimbus Neurite Lab', role: 'scientist' }],
    })
  })
})
