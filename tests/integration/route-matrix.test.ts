import { randomBytes } from 'node:crypto'
import express, { type Express } from 'express'
import request, { type Response } from 'supertest'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { db } from '../../server/db'
import { insertOutboxMessage } from '../../server/repositories/mail-outbox.repo'
import { insertReceivedMail } from '../../server/repositories/received-mails.repo'
import { appWriteHeaders, closeConnections, createTestApp, signIn } from '../support/api'
import { asUser } from '../support/as-user'
import { createLabWithTeam, createUser, uniqueEmail, uniqueSuffix, type TestUser } from '../support/factories'
import { finishQueuedVersion } from '../support/finished-version'
import { listRoutes } from '../support/list-routes'
import { invitationTokenIn, latestOutboxRowTo } from '../support/mail'

/**
 * Every API route against every role. The table below must list each route the app serves (the
 * first test fails for a route without an entry, and for an entry without a route). Statuses are
 * what the route must answer to that person for a request that is otherwise valid: 401 anonymous,
 * 403 a member whose role may not, 404 for ids in labs the caller is not in (never 403 there).
 * The share-link holder is someone without an account holding a valid link to one analysis
 * version (c.shareToken); on routes that take no token they are anonymous, so their column may be
 * left out and then equals the anonymous one. Everyone else gets an unknown token.
 */
const ROLES = ['anonymous', 'scientist', 'pi', 'biostatistician', 'admin', 'otherLab', 'shareHolder'] as const
type Role = (typeof ROLES)[number]
type Api = ReturnType<typeof asUser>

interface World {
  labId: number
  datasetId: number
  projectId: number
  analysisId: number
  uploadToken: string
  receivedMailId: number
  /** A finished analysis (written by the scientist) for review and share routes. */
  doneAnalysisId: number
  planId: number
  /** A valid link to version 1 of doneAnalysisId, with the unit table allowed. */
  shareToken: string
  users: Record<Exclude<Role, 'anonymous' | 'shareHolder'>, TestUser>
}

interface CaseContext {
  role: Role
  /** Requests with the role's shared session. */
  api: Api
  /** A session of its own, for requests that end or replace the session. */
  freshApi(): Promise<Api>
  w: World
  /** The valid share token for the share-link holder; an unknown one for everybody else. */
  shareToken: string
}

type Statuses = [
  anonymous: number,
  scientist: number,
  pi: number,
  biostatistician: number,
  admin: number,
  otherLab: number,
  shareHolder?: number,
]
type Case = [route: string, statuses: Statuses, send: (c: CaseContext) => Promise<Response>]

const app = createTestApp({ loginRateLimit: 100_000 })
const csv = Buffer.from(
  [
    'lab,mouse,treatment,cell,neurite_length_um',
    ...Array.from({ length: 40 }, (_, i) => {
      const mouse = Math.floor(i / 5)
      return `${mouse < 4 ? 'Nimbus' : 'Fernhill'},m${(mouse % 4) + 1},${mouse % 2 ? 'vehicle' : 'NW-117'},${(i % 5) + 1},${(110 + ((i * 37) % 50) + 0.25).toFixed(2)}`
    }),
  ].join('\n') + '\n',
)

function upload(cookie: string, labId: number, token?: string) {
  const req = request(app).post('/api/v1/datasets').set(appWriteHeaders).set('Cookie', cookie)
  if (token) req.set('X-Upload-Token', token)
  return req
    .field('labId', String(labId))
    .field('projectName', 'Route matrix')
    .attach('file', csv, 'cells.csv')
}

function expectStatus(res: Response, status: number, what: string): Response {
  if (res.status !== status) throw new Error(`${what}: ${res.status} ${JSON.stringify(res.body)}`)
  return res
}

const cookies = new Map<Role, string>()
const w = {} as World
const apiOf = (role: Role) => asUser(app, cookies.get(role))

/** Builders the write cases use to make their own target, so each role acts on a fresh one. */
const make = {
  async dataset(): Promise<number> {
    return expectStatus(await upload(cookies.get('scientist')!, w.labId), 201, 'upload').body.data.id
  },
  async member(): Promise<number> {
    const lab = { id: w.labId, name: '', slug: '', createdAt: new Date() }
    return (await createUser({ memberships: [{ lab, role: 'scientist' }] })).id
  },
  async invitation(): Promise<{ id: number; token: string; email: string }> {
    const email = uniqueEmail('matrix')
    const res = await apiOf('pi').post(`/api/v1/labs/${w.labId}/invitations`, { email, role: 'scientist' })
    expectStatus(res, 201, 'invitation')
    return {
      id: res.body.data.id,
      token: invitationTokenIn((await latestOutboxRowTo(email)).text_body),
      email,
    }
  },
  async exclusion(): Promise<number> {
    const body = {
      kind: 'rule',
      rule: { column: 'neurite_length_um', operator: 'gt', value: 10_000 },
      reason: 'matrix check',
    }
    const res = await apiOf('scientist').post(`/api/v1/datasets/${w.datasetId}/versions/1/exclusions`, body)
    return expectStatus(res, 201, 'exclusion').body.data.id
  },
  async analysis(): Promise<number> {
    const res = await apiOf('scientist').post('/api/v1/analyses', { datasetId: w.datasetId })
    return expectStatus(res, 201, 'analysis').body.data.id
  },
  async doneAnalysis(): Promise<number> {
    const id = await make.analysis()
    await finishQueuedVersion(id)
    return id
  },
  async reviewRequest(): Promise<number> {
    const analysisId = await make.doneAnalysis()
    const res = await apiOf('scientist').post(`/api/v1/analyses/${analysisId}/versions/1/review-requests`, {
      reviewerId: w.users.biostatistician.id,
    })
    return expectStatus(res, 201, 'review request').body.data.id
  },
  async shareLink(): Promise<number> {
    const res = await apiOf('pi').post(`/api/v1/analyses/${w.doneAnalysisId}/share-links`, { versionNo: 1 })
    return expectStatus(res, 201, 'share link').body.data.id
  },
  async plan(): Promise<number> {
    const res = await apiOf('scientist').post('/api/v1/plans', {
      labId: w.labId,
      name: `Plan ${uniqueSuffix()}`,
      inputs: planInputs,
    })
    return expectStatus(res, 201, 'plan').body.data.id
  },
  async failedMail(): Promise<number> {
    const id = await insertOutboxMessage({
      to: uniqueEmail('mail'),
      subject: 'Matrix',
      text: 'Matrix',
      kind: 'invitation',
    })
    await db('mail_outbox').where({ id }).update({ status: 'failed', attempts: 5 })
    return id
  },
}

const planInputs = {
  icc: 0.1,
  spread: { kind: 'total', sdTotal: 2 },
  difference: 1,
  costPerUnit: 100,
  costPerObs: 1,
}
const pl = (path = '') => `/api/v1/plans/${w.planId}${path}`

const ds = (path = '') => `/api/v1/datasets/${w.datasetId}${path}`
const v1 = (path = '') => ds(`/versions/1${path}`)
const an = (path = '') => `/api/v1/analyses/${w.analysisId}${path}`
const lab = (path = '') => `/api/v1/labs/${w.labId}${path}`
const done = (path = '') => `/api/v1/analyses/${w.doneAnalysisId}${path}`

// prettier-ignore
const cases: Case[] = [
  //                                                           anon sci  pi   bio  admin other
  ['GET /api/health',                                          [200, 200, 200, 200, 200, 200], (c) => c.api.get('/api/health')],
  ['GET /api/health/live',                                     [200, 200, 200, 200, 200, 200], (c) => c.api.get('/api/health/live')],
  ['GET /api/health/ready',                                    [200, 200, 200, 200, 200, 200], (c) => c.api.get('/api/health/ready')],

  // sign-in: each person with their own password (anonymous: a wrong one), in a session of its own
  ['POST /api/v1/auth/login',                                  [401, 200, 200, 200, 200, 200], async (c) => {
    const user = c.role === 'anonymous' || c.role === 'shareHolder' ? undefined : c.w.users[c.role]
    return (await c.freshApi()).post('/api/v1/auth/login', { email: user?.email ?? w.users.scientist.email, password: user?.password ?? 'wrong password' })
  }],
  ['POST /api/v1/auth/logout',                                 [204, 204, 204, 204, 204, 204], async (c) => (await c.freshApi()).post('/api/v1/auth/logout')],
  ['GET /api/v1/auth/me',                                      [401, 200, 200, 200, 200, 200], (c) => c.api.get('/api/v1/auth/me')],
  // who is signed in, if anyone: nobody is an answer, not an error
  ['GET /api/v1/auth/session',                                 [200, 200, 200, 200, 200, 200], (c) => c.api.get('/api/v1/auth/session')],

  // labs, members, invitations, audit
  ['GET /api/v1/labs',                                         [401, 200, 200, 200, 200, 200], (c) => c.api.get('/api/v1/labs')],
  ['GET /api/v1/labs/:labId/members',                          [401, 200, 200, 200, 200, 404], (c) => c.api.get(lab('/members'))],
  ['PATCH /api/v1/labs/:labId/members/:userId',                [401, 403, 200, 403, 200, 404], async (c) => c.api.patch(lab(`/members/${await make.member()}`), { role: 'biostatistician' })],
  ['DELETE /api/v1/labs/:labId/members/:userId',               [401, 403, 204, 403, 204, 404], async (c) => c.api.delete(lab(`/members/${await make.member()}`))],
  ['GET /api/v1/labs/:labId/invitations',                      [401, 403, 200, 403, 200, 404], (c) => c.api.get(lab('/invitations'))],
  ['POST /api/v1/labs/:labId/invitations',                     [401, 403, 201, 403, 201, 404], (c) => c.api.post(lab('/invitations'), { email: uniqueEmail('invitee'), role: 'scientist' })],
  ['DELETE /api/v1/labs/:labId/invitations/:invitationId',     [401, 403, 200, 403, 200, 404], async (c) => c.api.delete(lab(`/invitations/${(await make.invitation()).id}`))],
  ['GET /api/v1/labs/:labId/audit',                            [401, 403, 200, 403, 200, 404], (c) => c.api.get(lab('/audit'))],

  // the invitation landing page is public; someone signed in as another address may not accept
  ['POST /api/v1/invitations/lookup',                          [200, 200, 200, 200, 200, 200], async (c) => c.api.post('/api/v1/invitations/lookup', { token: (await make.invitation()).token })],
  ['POST /api/v1/invitations/accept',                          [200, 409, 409, 409, 409, 409], async (c) =>
    c.api.post('/api/v1/invitations/accept', { token: (await make.invitation()).token, name: 'Matrix Person', password: 'a long new password' })],

  // instance administration
  ['GET /api/v1/admin/users',                                  [401, 403, 403, 403, 200, 403], (c) => c.api.get('/api/v1/admin/users')],
  ['POST /api/v1/admin/labs',                                  [401, 403, 403, 403, 201, 403], (c) => c.api.post('/api/v1/admin/labs', { name: `Matrix Lab ${uniqueSuffix()}` })],
  ['GET /api/v1/admin/audit',                                  [401, 403, 403, 403, 200, 403], (c) => c.api.get('/api/v1/admin/audit')],
  ['GET /api/v1/admin/mail/delivery',                          [401, 403, 403, 403, 200, 403], (c) => c.api.get('/api/v1/admin/mail/delivery')],
  ['GET /api/v1/admin/mail/outbox',                            [401, 403, 403, 403, 200, 403], (c) => c.api.get('/api/v1/admin/mail/outbox')],
  ['POST /api/v1/admin/mail/outbox/:mailId/retry',             [401, 403, 403, 403, 200, 403], async (c) => c.api.post(`/api/v1/admin/mail/outbox/${await make.failedMail()}/retry`)],
  ['GET /api/v1/admin/mail/received',                          [401, 403, 403, 403, 200, 403], (c) => c.api.get('/api/v1/admin/mail/received')],
  ['GET /api/v1/admin/mail/received/:mailId',                  [401, 403, 403, 403, 200, 403], (c) => c.api.get(`/api/v1/admin/mail/received/${w.receivedMailId}`)],

  // datasets: members read; scientists and PIs write; admins outside the lab see nothing (404)
  // Upload progress is private to the uploader (the scientist here).
  ['GET /api/v1/datasets/uploads/:token',                      [401, 200, 404, 404, 404, 404], (c) => c.api.get(`/api/v1/datasets/uploads/${w.uploadToken}`)],
  ['GET /api/v1/datasets',                                     [401, 200, 200, 200, 200, 200], (c) => c.api.get('/api/v1/datasets')],
  ['POST /api/v1/datasets',                                    [401, 201, 201, 403, 404, 404], (c) => upload(cookies.get(c.role) ?? '', w.labId)],
  ['GET /api/v1/datasets/:datasetId',                          [401, 200, 200, 200, 404, 404], (c) => c.api.get(ds())],
  ['PATCH /api/v1/datasets/:datasetId',                        [401, 200, 200, 403, 404, 404], (c) => c.api.patch(ds(), { description: `edited by ${c.role}` })],
  // Deleting: the uploader (the scientist) or a PI.
  ['DELETE /api/v1/datasets/:datasetId',                       [401, 204, 204, 403, 404, 404], async (c) => c.api.delete(`/api/v1/datasets/${await make.dataset()}`)],
  // Restoring is an instance-admin task (role-based, so 403 reveals nothing about the lab).
  ['POST /api/v1/datasets/:datasetId/restore',                 [401, 403, 403, 403, 200, 403], async (c) => {
    const id = await make.dataset()
    expectStatus(await apiOf('scientist').delete(`/api/v1/datasets/${id}`), 204, 'delete before restore')
    return c.api.post(`/api/v1/datasets/${id}/restore`)
  }],
  ['POST /api/v1/datasets/:datasetId/versions',                [401, 201, 201, 403, 404, 404], (c) =>
    request(app).post(ds('/versions')).set(appWriteHeaders).set('Cookie', cookies.get(c.role) ?? '').attach('file', csv, 'cells.csv')],
  ['GET /api/v1/datasets/:datasetId/versions/:versionNo',      [401, 200, 200, 200, 404, 404], (c) => c.api.get(v1())],
  ['GET /api/v1/datasets/:datasetId/versions/:versionNo/columns', [401, 200, 200, 200, 404, 404], (c) => c.api.get(v1('/columns'))],
  ['GET /api/v1/datasets/:datasetId/versions/:versionNo/rows', [401, 200, 200, 200, 404, 404], (c) => c.api.get(v1('/rows'))],
  ['GET /api/v1/datasets/:datasetId/versions/:versionNo/suggestion', [401, 200, 200, 200, 404, 404], (c) => c.api.get(v1('/suggestion'))],
  ['GET /api/v1/datasets/:datasetId/versions/:versionNo/tagging', [401, 200, 200, 200, 404, 404], (c) => c.api.get(v1('/tagging'))],
  ['PUT /api/v1/datasets/:datasetId/versions/:versionNo/tagging', [401, 200, 200, 403, 404, 404], (c) =>
    c.api.put(v1('/tagging'), { responseColumns: ['neurite_length_um'], conditionColumn: 'treatment', levels: ['lab', 'mouse'] })],
  ['GET /api/v1/datasets/:datasetId/versions/:versionNo/tagging/history', [401, 200, 200, 200, 404, 404], (c) => c.api.get(v1('/tagging/history'))],
  ['GET /api/v1/datasets/:datasetId/versions/:versionNo/design', [401, 200, 200, 200, 404, 404], (c) => c.api.get(v1('/design'))],
  ['GET /api/v1/datasets/:datasetId/versions/:versionNo/exclusions', [401, 200, 200, 200, 404, 404], (c) => c.api.get(v1('/exclusions'))],
  ['POST /api/v1/datasets/:datasetId/versions/:versionNo/exclusions', [401, 201, 201, 403, 404, 404], (c) =>
    c.api.post(v1('/exclusions'), { kind: 'rule', rule: { column: 'neurite_length_um', operator: 'gt', value: 20_000 }, reason: `matrix ${c.role}` })],
  ['DELETE /api/v1/datasets/:datasetId/versions/:versionNo/exclusions/:exclusionId', [401, 200, 200, 403, 404, 404], async (c) =>
    c.api.delete(v1(`/exclusions/${await make.exclusion()}`))],
  ['GET /api/v1/datasets/:datasetId/versions/:versionNo/original', [401, 200, 200, 200, 404, 404], (c) => c.api.get(v1('/original'))],

  // projects
  ['GET /api/v1/projects',                                     [401, 200, 200, 200, 200, 200], (c) => c.api.get('/api/v1/projects')],
  ['POST /api/v1/projects',                                    [401, 201, 201, 403, 404, 404], (c) => c.api.post('/api/v1/projects', { labId: w.labId, name: `Project ${uniqueSuffix()}` })],
  ['PATCH /api/v1/projects/:projectId',                        [401, 200, 200, 403, 404, 404], (c) => c.api.patch(`/api/v1/projects/${w.projectId}`, { description: `by ${c.role}` })],

  // analyses: members read; scientists and PIs create, rename and run versions
  ['GET /api/v1/analyses',                                     [401, 200, 200, 200, 200, 200], (c) => c.api.get('/api/v1/analyses')],
  ['GET /api/v1/analyses/defaults',                            [401, 200, 200, 200, 404, 404], (c) => c.api.get(`/api/v1/analyses/defaults?datasetId=${w.datasetId}`)],
  ['POST /api/v1/analyses',                                    [401, 201, 201, 403, 404, 404], (c) => c.api.post('/api/v1/analyses', { datasetId: w.datasetId })],
  ['GET /api/v1/analyses/:analysisId',                         [401, 200, 200, 200, 404, 404], (c) => c.api.get(an())],
  ['PATCH /api/v1/analyses/:analysisId',                       [401, 200, 200, 403, 404, 404], (c) => c.api.patch(an(), { name: `Renamed by ${c.role}` })],
  ['POST /api/v1/analyses/:analysisId/versions',               [401, 201, 201, 403, 404, 404], async (c) =>
    c.api.post(`/api/v1/analyses/${await make.analysis()}/versions`, { settings: { bootstrap: { seed: `matrix ${c.role}` } } })],
  ['GET /api/v1/analyses/:analysisId/versions/:versionNo',     [401, 200, 200, 200, 404, 404], (c) => c.api.get(an('/versions/1'))],
  ['GET /api/v1/analyses/:analysisId/versions/:versionNo/status', [401, 200, 200, 200, 404, 404], (c) => c.api.get(an('/versions/1/status'))],
  // No runner in this test, so the version is still queued: members pass the permission check and
  // get 409 "not done yet"; outsiders never learn that much.
  ['GET /api/v1/analyses/:analysisId/versions/:versionNo/units.csv', [401, 409, 409, 409, 404, 404], (c) => c.api.get(an('/versions/1/units.csv'))],
  // "check it in R": every member of the lab, for a finished version
  ['GET /api/v1/analyses/:analysisId/versions/:versionNo/r/script.R', [401, 200, 200, 200, 404, 404], (c) => c.api.get(done('/versions/1/r/script.R'))],
  ['GET /api/v1/analyses/:analysisId/versions/:versionNo/r/rows.csv', [401, 200, 200, 200, 404, 404], (c) => c.api.get(done('/versions/1/r/rows.csv'))],

  // review and sign-off: members read and comment; scientists and PIs ask a biostatistician;
  // only the addressed biostatistician decides; the requester or a PI withdraws
  ['GET /api/v1/analyses/:analysisId/versions/:versionNo/review', [401, 200, 200, 200, 404, 404], (c) => c.api.get(done('/versions/1/review'))],
  ['GET /api/v1/analyses/:analysisId/versions/:versionNo/sign-off', [401, 200, 200, 200, 404, 404], (c) => c.api.get(done('/versions/1/sign-off'))],
  ['POST /api/v1/analyses/:analysisId/versions/:versionNo/review-requests', [401, 201, 201, 403, 404, 404], async (c) =>
    c.api.post(`/api/v1/analyses/${await make.doneAnalysis()}/versions/1/review-requests`, { reviewerId: w.users.biostatistician.id })],
  ['POST /api/v1/analyses/:analysisId/versions/:versionNo/comments', [401, 201, 201, 201, 404, 404], (c) => c.api.post(done('/versions/1/comments'), { body: `matrix ${c.role}` })],
  ['GET /api/v1/review-requests',                              [401, 200, 200, 200, 200, 200], (c) => c.api.get('/api/v1/review-requests')],
  ['POST /api/v1/review-requests/:requestId/decision',         [401, 403, 403, 200, 404, 404], async (c) =>
    c.api.post(`/api/v1/review-requests/${await make.reviewRequest()}/decision`, { decision: 'signed_off' })],
  ['POST /api/v1/review-requests/:requestId/withdraw',         [401, 200, 200, 403, 404, 404], async (c) =>
    c.api.post(`/api/v1/review-requests/${await make.reviewRequest()}/withdraw`)],

  // share links: members see them; a PI or the analysis' author (the scientist) shares and withdraws
  ['GET /api/v1/analyses/:analysisId/share-links',             [401, 200, 200, 200, 404, 404], (c) => c.api.get(done('/share-links'))],
  ['POST /api/v1/analyses/:analysisId/share-links',            [401, 201, 201, 403, 404, 404], (c) => c.api.post(done('/share-links'), { versionNo: 1 })],
  ['DELETE /api/v1/analyses/:analysisId/share-links/:linkId',  [401, 200, 200, 403, 404, 404], async (c) => c.api.delete(done(`/share-links/${await make.shareLink()}`))],
  // the link holder's read-only namespace: only a valid token opens anything
  ['GET /api/v1/shared/:token',                                [404, 404, 404, 404, 404, 404, 200], (c) => c.api.get(`/api/v1/shared/${c.shareToken}`)],
  ['GET /api/v1/shared/:token/units.csv',                      [404, 404, 404, 404, 404, 404, 200], (c) => c.api.get(`/api/v1/shared/${c.shareToken}/units.csv`)],
  ['GET /api/v1/shared/:token/r/script.R',                     [404, 404, 404, 404, 404, 404, 200], (c) => c.api.get(`/api/v1/shared/${c.shareToken}/r/script.R`)],
  ['GET /api/v1/shared/:token/r/rows.csv',                     [404, 404, 404, 404, 404, 404, 200], (c) => c.api.get(`/api/v1/shared/${c.shareToken}/r/rows.csv`)],

  // experiment plans: members read; scientists and PIs save, rename, attach and delete; anyone signed in may preview numbers
  ['GET /api/v1/plans',                                        [401, 200, 200, 200, 200, 200], (c) => c.api.get('/api/v1/plans')],
  ['GET /api/v1/plans/defaults',                               [401, 200, 200, 200, 404, 404], (c) => c.api.get(`/api/v1/plans/defaults?analysisId=${w.doneAnalysisId}&versionNo=1`)],
  ['POST /api/v1/plans/preview',                               [401, 200, 200, 200, 200, 200], (c) => c.api.post('/api/v1/plans/preview', { inputs: planInputs })],
  ['POST /api/v1/plans',                                       [401, 201, 201, 403, 404, 404], (c) => c.api.post('/api/v1/plans', { labId: w.labId, name: `Plan by ${c.role}`, inputs: planInputs })],
  ['GET /api/v1/plans/:planId',                                [401, 200, 200, 200, 404, 404], (c) => c.api.get(pl())],
  ['PATCH /api/v1/plans/:planId',                              [401, 200, 200, 403, 404, 404], (c) => c.api.patch(pl(), { name: `Renamed by ${c.role}` })],
  ['DELETE /api/v1/plans/:planId',                             [401, 204, 204, 403, 404, 404], async (c) => c.api.delete(`/api/v1/plans/${await make.plan()}`)],
  // agreement between labs: members read; the world's table has two labs, so members get 422 (too few labs)
  ['GET /api/v1/analyses/:analysisId/versions/:versionNo/agreement', [401, 422, 422, 422, 404, 404], (c) => c.api.get(done('/versions/1/agreement'))],

  // the lab board: every member of the lab
  ['GET /api/v1/labs/:labId/board',                            [401, 200, 200, 200, 404, 404], (c) => c.api.get(lab('/board'))],
]

beforeAll(async () => {
  const team = await createLabWithTeam()
  const other = await createLabWithTeam()
  const admin = await createUser({ isAdmin: true })
  w.labId = team.lab.id
  w.users = {
    scientist: team.scientist,
    pi: team.pi,
    biostatistician: team.biostatistician,
    admin,
    otherLab: other.pi,
  }
  for (const role of ROLES) {
    if (role !== 'anonymous' && role !== 'shareHolder')
      cookies.set(role, await signIn(app, w.users[role].email, w.users[role].password))
  }

  w.uploadToken = `matrix-${Date.now()}`
  const uploaded = expectStatus(
    await upload(cookies.get('scientist')!, w.labId, w.uploadToken),
    201,
    'world upload',
  )
  w.datasetId = uploaded.body.data.id
  w.projectId = uploaded.body.data.project?.id ?? uploaded.body.data.projectId
  const tagging = {
    responseColumns: ['neurite_length_um'],
    conditionColumn: 'treatment',
    levels: ['lab', 'mouse'],
  }
  expectStatus(await apiOf('scientist').put(v1('/tagging'), tagging), 200, 'world tagging')
  w.analysisId = await make.analysis()
  w.doneAnalysisId = await make.doneAnalysis()
  w.planId = await make.plan()
  const link = await apiOf('scientist').post(done('/share-links'), { versionNo: 1, allowUnitTable: true })
  w.shareToken = expectStatus(link, 201, 'world share link').body.data.token
  w.receivedMailId = await insertReceivedMail({
    envelopeFrom: 'no-reply@nestwise.invalid',
    envelopeTo: ['matrix@example.test'],
    messageId: null,
    from: null,
    to: null,
    subject: 'Matrix',
    text: 'Matrix',
    html: null,
    raw: 'Subject: Matrix\r\n\r\nMatrix',
  })
})

afterAll(closeConnections)

describe('the route table', () => {
  it('lists every API route of the app, and only those', () => {
    const served = listRoutes(app)
      .filter((r) => r.path.startsWith('/api'))
      .map((r) => `${r.method} ${r.path}`)
    const listed = cases.map(([route]) => route)
    expect(served).toContain('GET /api/health')
    expect(
      listed.filter((route, i) => listed.indexOf(route) !== i),
      'listed twice',
    ).toEqual([])
    expect(
      served.filter((route) => !listed.includes(route)),
      'served but missing from the table',
    ).toEqual([])
    expect(
      listed.filter((route) => !served.includes(route)),
      'in the table but not served',
    ).toEqual([])
  })

  it('reads nested routers, methods and mount paths the way Express 5 stores them', () => {
    const inner = express.Router()
    inner.get('/', () => {})
    inner
      .route('/:id')
      .get(() => {})
      .delete(() => {})
    const deeper = express.Router()
    deeper.post('/go', () => {})
    inner.use('/deeper', deeper)
    const probe: Express = express()
    probe.use('/api/things', inner)
    probe.put('/top', () => {})
    expect(listRoutes(probe)).toEqual([
      { method: 'GET', path: '/api/things' },
      { method: 'GET', path: '/api/things/:id' },
      { method: 'DELETE', path: '/api/things/:id' },
      { method: 'POST', path: '/api/things/deeper/go' },
      { method: 'PUT', path: '/top' },
    ])
  })
})

describe('who may call what', () => {
  for (const [route, statuses, send] of cases) {
    it(route, async () => {
      const mismatches: string[] = []
      for (const [index, role] of ROLES.entries()) {
        const context: CaseContext = {
          role,
          api: apiOf(role),
          freshApi: async () =>
            role === 'anonymous' || role === 'shareHolder'
              ? asUser(app)
              : asUser(app, await signIn(app, w.users[role].email, w.users[role].password)),
          w,
          shareToken: role === 'shareHolder' ? w.shareToken : randomBytes(32).toString('base64url'),
        }
        const expected = statuses[index] ?? statuses[0]
        const res = await send(context)
        if (res.status !== expected) {
          mismatches.push(
            `${role}: expected ${expected}, got ${res.status} ${JSON.stringify(res.body?.error ?? '')}`,
          )
        }
      }
      expect(mismatches).toEqual([])
    })
  }
})
