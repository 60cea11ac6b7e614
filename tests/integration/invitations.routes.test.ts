import { createHash } from 'node:crypto'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { db } from '../../server/db'
import { closeConnections, createTestApp, postLogin, sessionCookieFrom, signIn } from '../support/api'
import { asUser } from '../support/as-user'
import { createLab, createLabWithTeam, createUser, uniqueEmail, type TestUser } from '../support/factories'
import { invitationTokenIn, latestOutboxRowTo } from '../support/mail'

// Accepting counts failed tries against the sign-in limits; these tests fail on purpose a lot.
const app = createTestApp({ loginRateLimit: 1000 })
afterAll(closeConnections)

const cookies = new Map<number, string>()
async function as(user: TestUser) {
  if (!cookies.has(user.id)) cookies.set(user.id, await signIn(app, user.email, user.password))
  return asUser(app, cookies.get(user.id))
}
const anonymous = () => asUser(app)

/** Invites through the API and reads the token back from the queued e-mail, as the invitee would. */
async function invite(inviter: TestUser, labId: number, email: string, role = 'scientist') {
  const res = await (await as(inviter)).post(`/api/v1/labs/${labId}/invitations`, { email, role })
  expect(res.status, JSON.stringify(res.body)).toBe(201)
  const mail = await latestOutboxRowTo(email)
  return { invitation: res.body.data, token: invitationTokenIn(mail.text_body), mail }
}

async function auditActions(labId: number): Promise<string[]> {
  const rows: { action: string }[] = await db('audit_events').where({ lab_id: labId }).orderBy('id')
  return rows.map((r) => r.action)
}

let team: Awaited<ReturnType<typeof createLabWithTeam>>
beforeAll(async () => {
  team = await createLabWithTeam()
})

describe('internationalised addresses', () => {
  it('invites jörg@müller.de, who joins and signs in with the address as typed', async () => {
    const email = `jörg.${Date.now().toString(36)}@müller.de`
    const { token } = await invite(team.pi, team.lab.id, email)
    const accepted = await anonymous().post('/api/v1/invitations/accept', {
      token,
      name: 'Jörg Test',
      password: 'a long new password',
    })
    expect(accepted.status, JSON.stringify(accepted.body)).toBe(200)
    expect(accepted.body.data.user.email).toBe(email)
    // Typed with a capital and a combining diaeresis, it is still the same account.
    const typed = email.replace('jörg', 'Jo\u0308rg')
    expect((await postLogin(app, typed, 'a long new password')).status).toBe(200)
  })
})

describe('creating invitations', () => {
  it('lets a PI invite by e-mail: a pending invitation, a queued e-mail with the link, and only the token hash stored', async () => {
    const email = uniqueEmail('newcomer')
    const { invitation, token, mail } = await invite(team.pi, team.lab.id, email, 'biostatistician')
    expect(invitation).toMatchObject({
      labId: team.lab.id,
      email,
      role: 'biostatistician',
      status: 'pending',
      invitedBy: { id: team.pi.id },
    })
    const days = (Date.parse(invitation.expiresAt) - Date.parse(invitation.createdAt)) / 86_400_000
    expect(days).toBeCloseTo(7, 3)

    expect(mail).toMatchObject({ kind: 'invitation', status: 'queued', attempts: 0 })
    expect(mail.subject).toContain(team.lab.name)
    expect(mail.text_body).toContain(`/join#${token}`)
    expect(token).toHaveLength(43)

    const row = await db('invitations').where({ id: invitation.id }).first()
    expect(row.token_hash).toBe(createHash('sha256').update(token).digest('hex'))
    expect(JSON.stringify(row)).not.toContain(token)
    expect(JSON.stringify(invitation)).not.toContain(token)
  })

  it('lists the lab’s invitations for its PI', async () => {
    const email = uniqueEmail('listed')
    await invite(team.pi, team.lab.id, email)
    const res = await (await as(team.pi)).get(`/api/v1/labs/${team.lab.id}/invitations`)
    expect(res.status).toBe(200)
    expect(res.body.data.find((i: { email: string }) => i.email === email)).toMatchObject({
      status: 'pending',
      role: 'scientist',
    })
  })

  it('refuses scientists and biostatisticians (403), other labs (404) and anonymous callers (401); admins may', async () => {
    const other = await createLabWithTeam()
    const body = { email: uniqueEmail('x'), role: 'scientist' }
    const path = `/api/v1/labs/${team.lab.id}/invitations`
    expect((await (await as(team.scientist)).post(path, body)).status).toBe(403)
    expect((await (await as(team.biostatistician)).post(path, body)).status).toBe(403)
    expect((await (await as(other.pi)).post(path, body)).status).toBe(404)
    expect((await anonymous().post(path, body)).status).toBe(401)
    const admin = await createUser({ isAdmin: true })
    expect((await (await as(admin)).post(path, body)).status).toBe(201)
  })

  it('answers 409 for someone who is already a member, and 400 for a bad address or role', async () => {
    const path = `/api/v1/labs/${team.lab.id}/invitations`
    const pi = await as(team.pi)
    const res = await pi.post(path, { email: team.scientist.email.toUpperCase(), role: 'pi' })
    expect(res.status).toBe(409)
    expect(res.body.error.details.reason).toBe('already_member')
    expect((await pi.post(path, { email: 'not-an-address', role: 'pi' })).status).toBe(400)
    expect((await pi.post(path, { email: uniqueEmail(), role: 'owner' })).status).toBe(400)
  })

  it('replaces an earlier unanswered invitation: only the newest link works', async () => {
    const email = uniqueEmail('twice')
    const first = await invite(team.pi, team.lab.id, email)
    const second = await invite(team.pi, team.lab.id, email, 'biostatistician')
    expect(
      (await anonymous().post('/api/v1/invitations/lookup', { token: first.token })).body.error.details
        .reason,
    ).toBe('revoked')
    const preview = await anonymous().post('/api/v1/invitations/lookup', { token: second.token })
    expect(preview.body.data.role).toBe('biostatistician')
  })
})

describe('accepting invitations', () => {
  it('creates the account of a new person, signs them in and puts them in the lab with the invited role', async () => {
    const email = uniqueEmail('fresh')
    const { token, invitation } = await invite(team.pi, team.lab.id, email, 'scientist')

    const preview = await anonymous().post('/api/v1/invitations/lookup', { token })
    expect(preview.status).toBe(200)
    expect(preview.body.data).toEqual({
      labName: team.lab.name,
      role: 'scientist',
      email,
      invitedByName: team.pi.name,
      expiresAt: invitation.expiresAt,
      accountExists: false,
    })

    const res = await anonymous().post('/api/v1/invitations/accept', {
      token,
      name: 'Nell Vane',
      password: 'a long new password',
    })
    expect(res.status, JSON.stringify(res.body)).toBe(200)
    expect(res.body.data).toMatchObject({
      labId: team.lab.id,
      labName: team.lab.name,
      role: 'scientist',
      user: {
        email,
        name: 'Nell Vane',
        isAdmin: false,
        memberships: [{ labId: team.lab.id, role: 'scientist' }],
      },
    })
    const cookie = sessionCookieFrom(res)
    expect(cookie).toBeDefined()
    expect((await asUser(app, cookie).get('/api/v1/auth/me')).body.data.email).toBe(email)
    // The new password works for ordinary sign-in too.
    await signIn(app, email, 'a long new password')

    const accepted = await db('invitations').where({ id: invitation.id }).first()
    expect(accepted.accepted_by).toBe(res.body.data.user.id)
    expect((await auditActions(team.lab.id)).slice(-1)).toEqual(['invitation.accepted'])
  })

  it('asks a new person for a name and a password of at least 10 characters', async () => {
    const { token } = await invite(team.pi, team.lab.id, uniqueEmail('short'))
    const noName = await anonymous().post('/api/v1/invitations/accept', {
      token,
      password: 'a long new password',
    })
    expect(noName.status).toBe(400)
    expect(noName.body.error.details.issues[0].path).toBe('name')
    const short = await anonymous().post('/api/v1/invitations/accept', {
      token,
      name: 'Nell',
      password: 'short',
    })
    expect(short.status).toBe(400)
    expect(short.body.error.details.issues[0].path).toBe('password')
    // Nothing was used up by the failed tries.
    expect((await anonymous().post('/api/v1/invitations/lookup', { token })).status).toBe(200)
  })

  it('lets someone with an account join with their password, keeping their other lab and role', async () => {
    const elsewhere = await createLab()
    const person = await createUser({
      email: uniqueEmail('known'),
      memberships: [{ lab: elsewhere, role: 'pi' }],
    })
    const { token } = await invite(team.pi, team.lab.id, person.email, 'biostatistician')

    expect((await anonymous().post('/api/v1/invitations/lookup', { token })).body.data.accountExists).toBe(
      true,
    )
    expect((await anonymous().post('/api/v1/invitations/accept', { token })).status).toBe(401)
    expect(
      (await anonymous().post('/api/v1/invitations/accept', { token, password: 'not the password' })).status,
    ).toBe(401)

    const res = await anonymous().post('/api/v1/invitations/accept', {
      token,
      password: person.password,
      name: 'Ignored Name',
    })
    expect(res.status).toBe(200)
    const memberships = res.body.data.user.memberships.map((m: { labId: number; role: string }) => [
      m.labId,
      m.role,
    ])
    expect(memberships).toEqual(
      expect.arrayContaining([
        [elsewhere.id, 'pi'],
        [team.lab.id, 'biostatistician'],
      ]),
    )
    expect(res.body.data.user.name).toBe(person.name)
  })

  it('needs no password from the invited person when already signed in, and refuses someone else signed in', async () => {
    const person = await createUser({ email: uniqueEmail('signedin') })
    const { token } = await invite(team.pi, team.lab.id, person.email)
    const stranger = await createUser()
    const wrong = await (await as(stranger)).post('/api/v1/invitations/accept', { token })
    expect(wrong.status).toBe(409)
    expect(wrong.body.error.details.reason).toBe('signed_in_as_someone_else')

    const res = await (await as(person)).post('/api/v1/invitations/accept', { token })
    expect(res.status).toBe(200)
    expect(res.body.data.user.memberships).toEqual([
      { labId: team.lab.id, labName: team.lab.name, role: 'scientist' },
    ])
  })

  it('works only once', async () => {
    const email = uniqueEmail('once')
    const { token } = await invite(team.pi, team.lab.id, email)
    const body = { token, name: 'Once Only', password: 'a long new password' }
    expect((await anonymous().post('/api/v1/invitations/accept', body)).status).toBe(200)
    const again = await anonymous().post('/api/v1/invitations/accept', body)
    expect(again.status).toBe(404)
    expect(again.body.error.details.reason).toBe('accepted')
    expect((await anonymous().post('/api/v1/invitations/lookup', { token })).body.error.details.reason).toBe(
      'accepted',
    )
  })

  it('accepts two simultaneous uses of one link only once', async () => {
    const { token } = await invite(team.pi, team.lab.id, uniqueEmail('race'))
    const body = { token, name: 'Race Runner', password: 'a long new password' }
    const results = await Promise.all([
      anonymous().post('/api/v1/invitations/accept', body),
      anonymous().post('/api/v1/invitations/accept', body),
    ])
    expect(results.map((r) => r.status).sort()).toEqual([200, 404])
  })

  it('refuses an expired invitation', async () => {
    const { token, invitation } = await invite(team.pi, team.lab.id, uniqueEmail('late'))
    await db('invitations')
      .where({ id: invitation.id })
      .update({ expires_at: db.raw("now() - interval '1 minute'") })
    const lookup = await anonymous().post('/api/v1/invitations/lookup', { token })
    expect(lookup.status).toBe(404)
    expect(lookup.body.error.details.reason).toBe('expired')
    const accept = await anonymous().post('/api/v1/invitations/accept', {
      token,
      name: 'Too Late',
      password: 'a long new password',
    })
    expect(accept.status).toBe(404)
    const listed = await (await as(team.pi)).get(`/api/v1/labs/${team.lab.id}/invitations`)
    expect(listed.body.data.find((i: { id: number }) => i.id === invitation.id).status).toBe('expired')
  })

  it('refuses a revoked invitation; revoking twice or revoking an accepted one answers 409', async () => {
    const { token, invitation } = await invite(team.pi, team.lab.id, uniqueEmail('revoked'))
    const pi = await as(team.pi)
    const revoked = await pi.delete(`/api/v1/labs/${team.lab.id}/invitations/${invitation.id}`)
    expect(revoked.status).toBe(200)
    expect(revoked.body.data.status).toBe('revoked')
    const accept = await anonymous().post('/api/v1/invitations/accept', {
      token,
      name: 'Revoked',
      password: 'a long new password',
    })
    expect(accept.status).toBe(404)
    expect(accept.body.error.details.reason).toBe('revoked')
    expect((await pi.delete(`/api/v1/labs/${team.lab.id}/invitations/${invitation.id}`)).status).toBe(409)

    const used = await invite(team.pi, team.lab.id, uniqueEmail('used'))
    await anonymous().post('/api/v1/invitations/accept', {
      token: used.token,
      name: 'Used',
      password: 'a long new password',
    })
    expect((await pi.delete(`/api/v1/labs/${team.lab.id}/invitations/${used.invitation.id}`)).status).toBe(
      409,
    )
    expect(await auditActions(team.lab.id)).toContain('invitation.revoked')
  })

  it('does not reveal another lab’s invitations: revoking one through a different lab answers 404', async () => {
    const other = await createLabWithTeam()
    const { invitation } = await invite(other.pi, other.lab.id, uniqueEmail('elsewhere'))
    expect(
      (await (await as(team.pi)).delete(`/api/v1/labs/${team.lab.id}/invitations/${invitation.id}`)).status,
    ).toBe(404)
    expect(
      (await (await as(team.pi)).delete(`/api/v1/labs/${other.lab.id}/invitations/${invitation.id}`)).status,
    ).toBe(404)
  })

  it('answers 404 to an unknown token and 400 to a malformed one', async () => {
    const unknown = await anonymous().post('/api/v1/invitations/lookup', { token: 'A'.repeat(43) })
    expect(unknown.status).toBe(404)
    expect(unknown.body.error.details.reason).toBe('unknown')
    expect((await anonymous().post('/api/v1/invitations/lookup', { token: 'short' })).status).toBe(400)
  })
})

describe('managing members', () => {
  it('lets a PI change a role and remove a member; the change applies to the next request', async () => {
    const { lab, pi, scientist } = await createLabWithTeam()
    const piApi = await as(pi)
    const changed = await piApi.patch(`/api/v1/labs/${lab.id}/members/${scientist.id}`, {
      role: 'biostatistician',
    })
    expect(changed.status).toBe(200)
    expect(changed.body.data).toMatchObject({ userId: scientist.id, role: 'biostatistician' })
    const scientistApi = await as(scientist)
    expect((await scientistApi.get('/api/v1/auth/me')).body.data.memberships[0].role).toBe('biostatistician')

    expect((await piApi.delete(`/api/v1/labs/${lab.id}/members/${scientist.id}`)).status).toBe(204)
    expect((await scientistApi.get(`/api/v1/labs/${lab.id}/members`)).status).toBe(404)
    expect((await piApi.delete(`/api/v1/labs/${lab.id}/members/${scientist.id}`)).status).toBe(404)
    expect(await auditActions(lab.id)).toEqual(['member.role_changed', 'member.removed'])
    const [change] = await db('audit_events').where({ lab_id: lab.id, action: 'member.role_changed' })
    expect(change).toMatchObject({
      actor_user_id: pi.id,
      subject_type: 'user',
      subject_id: String(scientist.id),
    })
    expect(change.details).toEqual({ email: scientist.email, from: 'scientist', to: 'biostatistician' })
  })

  it('keeps at least one PI: the last PI can be neither demoted nor removed', async () => {
    const { lab, pi, biostatistician } = await createLabWithTeam()
    const piApi = await as(pi)
    const demote = await piApi.patch(`/api/v1/labs/${lab.id}/members/${pi.id}`, { role: 'scientist' })
    expect(demote.status).toBe(409)
    expect(demote.body.error.details.reason).toBe('last_pi')
    expect((await piApi.delete(`/api/v1/labs/${lab.id}/members/${pi.id}`)).status).toBe(409)

    // With a second PI, the first may step down.
    expect(
      (await piApi.patch(`/api/v1/labs/${lab.id}/members/${biostatistician.id}`, { role: 'pi' })).status,
    ).toBe(200)
    expect((await piApi.patch(`/api/v1/labs/${lab.id}/members/${pi.id}`, { role: 'scientist' })).status).toBe(
      200,
    )
  })

  it('lets two PIs not demote each other at the same moment into a lab without PI', async () => {
    const { lab, pi, scientist } = await createLabWithTeam()
    await (await as(pi)).patch(`/api/v1/labs/${lab.id}/members/${scientist.id}`, { role: 'pi' })
    const [a, b] = await Promise.all([
      (await as(pi)).patch(`/api/v1/labs/${lab.id}/members/${scientist.id}`, { role: 'scientist' }),
      (await as(scientist)).patch(`/api/v1/labs/${lab.id}/members/${pi.id}`, { role: 'scientist' }),
    ])
    const statuses = [a.status, b.status].sort()
    // One succeeds; the other either finds itself no longer PI (403) or the last PI (409).
    expect(statuses[0]).toBe(200)
    expect([403, 409]).toContain(statuses[1])
    const pis = await db('memberships').where({ lab_id: lab.id, role: 'pi' })
    expect(pis).toHaveLength(1)
  })

  it('refuses role changes by scientists (403) and by other labs (404)', async () => {
    const { lab, scientist, biostatistician } = await createLabWithTeam()
    const other = await createLabWithTeam()
    const path = `/api/v1/labs/${lab.id}/members/${biostatistician.id}`
    expect((await (await as(scientist)).patch(path, { role: 'pi' })).status).toBe(403)
    expect((await (await as(other.pi)).patch(path, { role: 'pi' })).status).toBe(404)
  })
})

describe('creating labs', () => {
  it('lets an admin create a lab and invite its first PI in one step', async () => {
    const admin = await createUser({ isAdmin: true })
    const name = `Quillwort Imaging Lab ${Date.now()}`
    const firstPiEmail = uniqueEmail('first-pi')
    const res = await (await as(admin)).post('/api/v1/admin/labs', { name, firstPiEmail })
    expect(res.status, JSON.stringify(res.body)).toBe(201)
    expect(res.body.data.lab).toMatchObject({ name, memberCount: 0, myRole: null })
    expect(res.body.data.lab.slug).toMatch(/^quillwort-imaging-lab-\d+$/)
    expect(res.body.data.invitation).toMatchObject({ email: firstPiEmail, role: 'pi', status: 'pending' })
    expect(await auditActions(res.body.data.lab.id)).toEqual(['lab.created', 'invitation.created'])

    const token = invitationTokenIn((await latestOutboxRowTo(firstPiEmail)).text_body)
    const accepted = await anonymous().post('/api/v1/invitations/accept', {
      token,
      name: 'First Pi',
      password: 'a long new password',
    })
    expect(accepted.body.data.role).toBe('pi')

    const again = await (await as(admin)).post('/api/v1/admin/labs', { name: name.toUpperCase() })
    expect(again.status).toBe(409)
  })

  it('gives a lab whose name differs only in punctuation its own slug', async () => {
    const admin = await createUser({ isAdmin: true })
    const base = `Ålder Lab ${Date.now()}`
    const first = await (await as(admin)).post('/api/v1/admin/labs', { name: base })
    const second = await (await as(admin)).post('/api/v1/admin/labs', { name: `${base}!` })
    expect(second.status).toBe(201)
    expect(second.body.data.lab.slug).toBe(`${first.body.data.lab.slug}-2`)
  })

  it('is for admins only', async () => {
    expect((await (await as(team.pi)).post('/api/v1/admin/labs', { name: 'Not Allowed Lab' })).status).toBe(
      403,
    )
  })
})
