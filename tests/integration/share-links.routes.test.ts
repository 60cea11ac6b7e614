import request from 'supertest'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { db } from '../../server/db'
import { hashInvitationToken } from '../../server/services/invitation-tokens'
import { appWriteHeaders, closeConnections, createTestApp } from '../support/api'
import { uniqueEmail } from '../support/factories'
import { latestOutboxRowTo } from '../support/mail'
import { finishedAnalysis, neuriteCsv, taggedDataset } from './analyses-support'
import { deleteAs, getAs, postAs, signedInTeam } from './datasets-support'

const app = createTestApp()
let team: Awaited<ReturnType<typeof signedInTeam>>
let outsider: Awaited<ReturnType<typeof signedInTeam>>
let analysisId: number
let otherAnalysisId: number

const links = (id = analysisId) => `/api/v1/analyses/${id}/share-links`
const shared = (token: string, path = '') => request(app).get(`/api/v1/shared/${token}${path}`)

async function createLink(cookie: string, body: object = {}) {
  const res = await postAs(app, cookie, links(), { versionNo: 1, ...body })
  expect(res.status, JSON.stringify(res.body)).toBe(201)
  return res.body.data as { id: number; token: string; url: string; expiresAt: string; status: string }
}

beforeAll(async () => {
  ;[team, outsider] = await Promise.all([signedInTeam(app), signedInTeam(app)])
  const dataset = await taggedDataset(
    app,
    team.cookies.scientist,
    team.lab.id,
    neuriteCsv({ seed: 'share', mice: 8 }),
  )
  analysisId = await finishedAnalysis(app, team.cookies.scientist, dataset.id, 'Shared one')
  otherAnalysisId = await finishedAnalysis(app, team.cookies.scientist, dataset.id, 'Never shared')
}, 120_000)

afterAll(closeConnections)

describe('creating a link', () => {
  it('gives a 43-character base64url token once, stores only its SHA-256, defaults to 30 days and audits it', async () => {
    const before = Date.now()
    const link = await createLink(team.cookies.pi)
    expect(link.token).toMatch(/^[A-Za-z0-9_-]{43}$/)
    expect(link.url).toMatch(new RegExp(`/s/${link.token}$`))
    const days = (new Date(link.expiresAt).getTime() - before) / 86_400_000
    expect(days).toBeGreaterThan(29.99)
    expect(days).toBeLessThan(30.01)
    const row = await db('share_links').where({ id: link.id }).first()
    expect(row.token_hash).toBe(hashInvitationToken(link.token))
    expect(JSON.stringify(row)).not.toContain(link.token)
    const listed = await getAs(app, team.cookies.biostatistician, links())
    expect(JSON.stringify(listed.body)).not.toContain(link.token)
    const audit = await db('audit_events')
      .where({ action: 'share_link.created', subject_id: String(link.id) })
      .first()
    expect(audit.details).toMatchObject({ analysisId, versionNo: 1, allowUnitTable: false })
    expect(JSON.stringify(audit.details)).not.toContain(link.token)
  })

  it('mails the link when asked, in the outbox', async () => {
    const to = uniqueEmail('collaborator')
    const link = await createLink(team.cookies.scientist, { mailTo: to, expiresInDays: 7 })
    const mail = await latestOutboxRowTo(to)
    expect(mail).toMatchObject({ kind: 'share_link' })
    expect(mail.text_body).toContain(link.url)
  })

  it('refuses more than 365 days, unfinished or unknown versions, biostatisticians and outsiders', async () => {
    expect((await postAs(app, team.cookies.pi, links(), { versionNo: 1, expiresInDays: 366 })).status).toBe(
      400,
    )
    expect((await postAs(app, team.cookies.pi, links(), { versionNo: 9 })).status).toBe(404)
    expect((await postAs(app, team.cookies.biostatistician, links(), { versionNo: 1 })).status).toBe(403)
    expect((await postAs(app, outsider.cookies.pi, links(), { versionNo: 1 })).status).toBe(404)
    const queued = await postAs(app, team.cookies.scientist, `/api/v1/analyses/${analysisId}/versions`, {
      settings: { reference: { treatment: 'NW-117' } },
    })
    expect(
      (await postAs(app, team.cookies.pi, links(), { versionNo: queued.body.data.versionNo })).status,
    ).toBe(409)
  })
})

describe('opening a link without an account', () => {
  it('shows the version’s result, chart and name; counts each opening, and audits the first of the hour', async () => {
    const link = await createLink(team.cookies.pi)
    const first = await shared(link.token)
    expect(first.status, JSON.stringify(first.body)).toBe(200)
    expect(first.headers['cache-control']).toBe('no-store')
    expect(first.body.data).toMatchObject({ analysisName: 'Shared one', versionNo: 1, allowUnitTable: false })
    expect(first.body.data.result.effectiveN).toBeGreaterThan(0)
    expect(first.body.data.chart).toBeTruthy()
    await shared(link.token)
    const row = await db('share_links').where({ id: link.id }).first()
    expect(row.open_count).toBe(2)
    expect(row.last_opened_at).not.toBeNull()
    const listed = (await getAs(app, team.cookies.pi, links())).body.data.find(
      (l: { id: number }) => l.id === link.id,
    )
    expect(listed).toMatchObject({ openCount: 2, status: 'active' })
    const opened = await db('audit_events').where({
      action: 'share_link.opened',
      subject_id: String(link.id),
    })
    expect(opened).toHaveLength(1)
    expect(opened[0].actor_user_id).toBeNull()
  })

  it('200 openings in a row from one visitor add one audit entry, and all 200 count on the link', async () => {
    // A limit high enough for the 200 to pass: the flood limit has its own test below.
    const roomy = createTestApp({ sharedRateLimit: 10_000 })
    const link = await createLink(team.cookies.pi)
    for (let k = 0; k < 200; k++) {
      const res = await request(roomy).get(`/api/v1/shared/${link.token}`)
      expect(res.status).toBe(200)
    }
    const opened = await db('audit_events').where({
      action: 'share_link.opened',
      subject_id: String(link.id),
    })
    expect(opened.length).toBeLessThanOrEqual(10)
    expect(opened).toHaveLength(1)
    expect((await db('share_links').where({ id: link.id }).first()).open_count).toBe(200)
    const visits = await db('share_link_visits').where({ share_link_id: link.id })
    expect(visits.map((v) => v.opens)).toEqual([200])
    expect(JSON.stringify(visits)).not.toContain('127.0.0.1')
  })

  it('audits each visitor (client address, behind a trusted proxy) once an hour', async () => {
    const proxied = createTestApp({ trustProxy: ['loopback'] })
    const link = await createLink(team.cookies.pi)
    for (const address of ['203.0.113.5', '203.0.113.5', '198.51.100.9', '203.0.113.5']) {
      const res = await request(proxied).get(`/api/v1/shared/${link.token}`).set('X-Forwarded-For', address)
      expect(res.status).toBe(200)
    }
    const opened = await db('audit_events').where({
      action: 'share_link.opened',
      subject_id: String(link.id),
    })
    expect(opened.map((row) => row.ip).sort()).toEqual(['198.51.100.9', '203.0.113.5'])
    expect((await db('share_links').where({ id: link.id }).first()).open_count).toBe(4)
  })

  it('answers a flood from one address with 429 and Retry-After', async () => {
    const strict = createTestApp({ sharedRateLimit: 5 })
    const link = await createLink(team.cookies.pi)
    for (let k = 0; k < 5; k++)
      expect((await request(strict).get(`/api/v1/shared/${link.token}`)).status).toBe(200)
    const flooded = await request(strict).get(`/api/v1/shared/${link.token}`)
    expect(flooded.status).toBe(429)
    expect(flooded.body.error.code).toBe('RATE_LIMITED')
    expect(Number(flooded.headers['retry-after'])).toBeGreaterThan(0)
    // Unknown tokens count too, so guessing is slowed as much as reading.
    expect((await request(strict).get('/api/v1/shared/not-a-token')).status).toBe(429)
  })

  it('answers 404 with a plain message for a tampered, expired or revoked link', async () => {
    const link = await createLink(team.cookies.pi)
    const flipped = (link.token[0] === 'A' ? 'B' : 'A') + link.token.slice(1)
    const tampered = await shared(flipped)
    expect(tampered.status).toBe(404)
    expect(tampered.body.error.message).toMatch(/does not work/)
    expect((await shared(link.token.slice(0, 20))).status).toBe(404)

    const expiring = await createLink(team.cookies.pi)
    await db('share_links')
      .where({ id: expiring.id })
      .update({ expires_at: db.raw(`now() - interval '1 second'`) })
    expect((await shared(expiring.token)).status).toBe(404)
    const listed = (await getAs(app, team.cookies.pi, links())).body.data.find(
      (l: { id: number }) => l.id === expiring.id,
    )
    expect(listed.status).toBe('expired')

    expect((await shared(link.token)).status).toBe(200)
    const revoked = await deleteAs(app, team.cookies.scientist, `${links()}/${link.id}`)
    expect(revoked.status).toBe(200)
    expect(revoked.body.data.status).toBe('revoked')
    expect((await shared(link.token)).status).toBe(404)
    expect((await deleteAs(app, team.cookies.pi, `${links()}/${link.id}`)).status).toBe(409)
    expect(
      await db('audit_events')
        .where({ action: 'share_link.revoked', subject_id: String(link.id) })
        .first(),
    ).toBeTruthy()
  })

  it('serves the unit table only when the creator allowed it', async () => {
    const closed = await createLink(team.cookies.pi)
    expect((await shared(closed.token, '/units.csv')).status).toBe(404)
    const open = await createLink(team.cookies.pi, { allowUnitTable: true })
    const csv = await shared(open.token, '/units.csv')
    expect(csv.status).toBe(200)
    expect(csv.headers['content-type']).toMatch(/text\/csv/)
    expect(csv.text.split('\n').length).toBeGreaterThan(2)
  })

  it('reaches nothing else: no other analysis, no rows, no writes, no session', async () => {
    const link = await createLink(team.cookies.pi, { allowUnitTable: true })
    for (const path of ['/rows', '/versions/1', `/../${otherAnalysisId}`, '/units.csv/../../x']) {
      expect([404], path).toContain((await shared(link.token, path)).status)
    }
    for (const method of ['post', 'put', 'patch', 'delete'] as const) {
      const res = await request(app)[method](`/api/v1/shared/${link.token}`).set(appWriteHeaders).send({})
      expect(res.status, method).toBe(404)
    }
    // The link gives no account: the rest of the API still wants a sign-in.
    expect((await request(app).get(`/api/v1/analyses/${analysisId}`)).status).toBe(401)
    expect((await request(app).get(`/api/v1/analyses/${otherAnalysisId}/versions/1`)).status).toBe(401)
    const body = JSON.stringify((await shared(link.token)).body)
    expect(body).not.toContain('Never shared')
    expect(body).not.toContain('"labId"')
  })

  it('a link to version 1 keeps showing version 1 after newer versions, and an id swap does not help', async () => {
    const link = await createLink(team.cookies.pi)
    const res = await shared(link.token)
    expect(res.body.data.versionNo).toBe(1)
    const other = await postAs(app, team.cookies.pi, links(otherAnalysisId), { versionNo: 1 })
    expect((await deleteAs(app, team.cookies.pi, `${links(analysisId)}/${other.body.data.id}`)).status).toBe(
      404,
    )
    expect((await deleteAs(app, outsider.cookies.pi, `${links()}/${link.id}`)).status).toBe(404)
  })

  it('stops working when the dataset is deleted', async () => {
    const link = await createLink(team.cookies.pi)
    const datasetId = (await db('analyses').where({ id: analysisId }).first('dataset_id')).dataset_id
    expect((await shared(link.token)).status).toBe(200)
    expect((await deleteAs(app, team.cookies.pi, `/api/v1/datasets/${datasetId}`)).status).toBe(204)
    expect((await shared(link.token)).status).toBe(404)
  })
})
