import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { db } from '../../server/db'
import { startAnalysisRunner, stopAnalysisRunner } from '../../server/jobs/analysis-runner'
import { closeConnections, createTestApp, signIn } from '../support/api'
import { createUser } from '../support/factories'
import { latestOutboxRowTo } from '../support/mail'
import { neuriteCsv, pollUntilFinished, taggedDataset } from './analyses-support'
import { getAs, postAs, signedInTeam } from './datasets-support'

const app = createTestApp()

let team: Awaited<ReturnType<typeof signedInTeam>>
let outsider: Awaited<ReturnType<typeof signedInTeam>>
/** A second biostatistician of the lab. */
let bio2: { id: number; email: string; cookie: string }
let analysisId: number

const base = () => `/api/v1/analyses/${analysisId}`

let changes = 0

/** A new version that differs from the newest by the bootstrap seed (the bootstrap stays off, so it runs fast). */
async function newVersion(cookie: string): Promise<number> {
  changes++
  const res = await postAs(app, cookie, `${base()}/versions`, {
    settings: { bootstrap: { seed: `review-change-${changes}` } },
  })
  expect(res.status, JSON.stringify(res.body)).toBe(201)
  const versionNo: number = res.body.data.versionNo
  await pollUntilFinished(app, cookie, analysisId, versionNo)
  return versionNo
}

async function requestReview(cookie: string, versionNo: number, reviewerId: number, message = '') {
  return postAs(app, cookie, `${base()}/versions/${versionNo}/review-requests`, { reviewerId, message })
}

beforeAll(async () => {
  startAnalysisRunner({ pollMs: 100, reapEveryMs: 500 })
  ;[team, outsider] = await Promise.all([signedInTeam(app), signedInTeam(app)])
  const second = await createUser({ memberships: [{ lab: team.lab, role: 'biostatistician' }] })
  bio2 = { id: second.id, email: second.email, cookie: await signIn(app, second.email, second.password) }
  const dataset = await taggedDataset(
    app,
    team.cookies.scientist,
    team.lab.id,
    neuriteCsv({ seed: 'reviews', mice: 8 }),
  )
  const created = await postAs(app, team.cookies.scientist, '/api/v1/analyses', { datasetId: dataset.id })
  expect(created.status, JSON.stringify(created.body)).toBe(201)
  analysisId = created.body.data.id
  await pollUntilFinished(app, team.cookies.scientist, analysisId, 1)
}, 120_000)

afterAll(async () => {
  await stopAnalysisRunner()
  await closeConnections()
})

describe('asking for a review', () => {
  it('lets the scientist ask a biostatistician of the lab, mails them in the same transaction and audits it', async () => {
    const res = await requestReview(
      team.cookies.scientist,
      1,
      team.biostatistician.id,
      'Is mouse the right unit?',
    )
    expect(res.status, JSON.stringify(res.body)).toBe(201)
    expect(res.body.data).toMatchObject({
      versionNo: 1,
      status: 'open',
      reviewer: { id: team.biostatistician.id },
      requestedBy: { id: team.scientist.id },
      message: 'Is mouse the right unit?',
    })
    const mail = await latestOutboxRowTo(team.biostatistician.email)
    expect(mail).toMatchObject({ kind: 'review_request' })
    expect(mail.text_body).toContain(`/analyses/${analysisId}?version=1`)
    expect(mail.text_body).toContain('Is mouse the right unit?')
    const audit = await db('audit_events')
      .where({ action: 'review.requested', subject_id: String(res.body.data.id) })
      .first()
    expect(audit).toMatchObject({ actor_user_id: team.scientist.id, lab_id: team.lab.id })
  })

  it('refuses a second open request to the same reviewer (409), a non-biostatistician reviewer (400) and biostatisticians as requesters (403)', async () => {
    expect((await requestReview(team.cookies.pi, 1, team.biostatistician.id)).status).toBe(409)
    expect((await requestReview(team.cookies.scientist, 1, team.pi.id)).status).toBe(400)
    expect((await requestReview(team.cookies.scientist, 1, outsider.biostatistician.id)).status).toBe(400)
    expect((await requestReview(team.cookies.biostatistician, 1, bio2.id)).status).toBe(403)
  })

  it('answers 404 to members of other labs, and to unknown versions', async () => {
    expect((await requestReview(outsider.cookies.scientist, 1, team.biostatistician.id)).status).toBe(404)
    expect((await getAs(app, outsider.cookies.pi, `${base()}/versions/1/review`)).status).toBe(404)
    expect((await getAs(app, team.cookies.pi, `${base()}/versions/99/review`)).status).toBe(404)
  })

  it('puts the request in the reviewer’s inbox, open first, and in nobody else’s', async () => {
    const mine = await getAs(app, team.cookies.biostatistician, '/api/v1/review-requests')
    expect(mine.status).toBe(200)
    expect(mine.body.data.map((r: { analysisId: number }) => r.analysisId)).toContain(analysisId)
    expect(mine.body.data[0].status).toBe('open')
    const others = await getAs(app, bio2.cookie, '/api/v1/review-requests')
    expect(others.body.data.filter((r: { analysisId: number }) => r.analysisId === analysisId)).toEqual([])
  })
})

describe('comments', () => {
  it('threads replies under their parent, in order, with authors; audits each comment', async () => {
    const top = await postAs(app, team.cookies.biostatistician, `${base()}/versions/1/comments`, {
      body: 'Mice are the units here; 4 per arm is thin.',
    })
    expect(top.status, JSON.stringify(top.body)).toBe(201)
    const reply = await postAs(app, team.cookies.scientist, `${base()}/versions/1/comments`, {
      body: 'Two more mice per arm are planned.',
      parentId: top.body.data.id,
    })
    expect(reply.status).toBe(201)
    expect(reply.body.data).toMatchObject({ parentId: top.body.data.id, author: { id: team.scientist.id } })

    const state = await getAs(app, team.cookies.pi, `${base()}/versions/1/review`)
    expect(state.status).toBe(200)
    const comments = state.body.data.comments as { id: number; parentId: number | null; body: string }[]
    const ids = comments.map((c) => c.id)
    expect(ids.indexOf(top.body.data.id)).toBeLessThan(ids.indexOf(reply.body.data.id))
    expect(comments.find((c) => c.id === reply.body.data.id)?.parentId).toBe(top.body.data.id)
    const audited = await db('audit_events')
      .where({ action: 'review.commented', lab_id: team.lab.id })
      .count<{ count: string }[]>('id as count')
    expect(Number(audited[0].count)).toBeGreaterThanOrEqual(2)
  })

  it('refuses a reply to a comment of another version, blank bodies and outsiders', async () => {
    const v1 = await getAs(app, team.cookies.pi, `${base()}/versions/1/review`)
    const parentId = v1.body.data.comments[0].id
    const versionNo = await newVersion(team.cookies.scientist)
    const crossed = await postAs(app, team.cookies.scientist, `${base()}/versions/${versionNo}/comments`, {
      body: 'x',
      parentId,
    })
    expect(crossed.status).toBe(400)
    expect(
      (await postAs(app, team.cookies.scientist, `${base()}/versions/1/comments`, { body: '   ' })).status,
    ).toBe(400)
    expect(
      (await postAs(app, outsider.cookies.pi, `${base()}/versions/1/comments`, { body: 'hi' })).status,
    ).toBe(404)
  }, 60_000)
})

describe('signing off', () => {
  let requestId: number

  it('is refused to anyone but the addressed biostatistician', async () => {
    const inbox = await getAs(app, team.cookies.biostatistician, '/api/v1/review-requests?scope=open')
    requestId = inbox.body.data.find(
      (r: { analysisId: number; versionNo: number }) => r.analysisId === analysisId && r.versionNo === 1,
    ).id
    const decide = (cookie: string) =>
      postAs(app, cookie, `/api/v1/review-requests/${requestId}/decision`, { decision: 'signed_off' })
    expect((await decide(team.cookies.scientist)).status).toBe(403)
    expect((await decide(team.cookies.pi)).status).toBe(403)
    expect((await decide(bio2.cookie)).status).toBe(403)
    expect((await decide(outsider.cookies.biostatistician)).status).toBe(404)
    expect(
      await db('sign_offs').whereIn(
        'analysis_version_id',
        db('analysis_versions').where({ analysis_id: analysisId }).select('id'),
      ),
    ).toEqual([])
  })

  it('records who and when with the SHA-256 over checksum, settings, engine version and result; mails the requester', async () => {
    const res = await postAs(
      app,
      team.cookies.biostatistician,
      `/api/v1/review-requests/${requestId}/decision`,
      {
        decision: 'signed_off',
        comment: 'Model and units are right.',
      },
    )
    expect(res.status, JSON.stringify(res.body)).toBe(200)
    expect(res.body.data.request.status).toBe('signed_off')
    const state = res.body.data.signOff
    expect(state.signedOff).toBe(true)
    expect(state.coveringSignOff).toMatchObject({
      versionNo: 1,
      signedBy: { id: team.biostatistician.id },
      hashValid: true,
    })
    expect(state.coveringSignOff.hash).toMatch(/^[0-9a-f]{64}$/)

    const mail = await latestOutboxRowTo(team.scientist.email)
    expect(mail).toMatchObject({ kind: 'review_decision' })
    expect(mail.subject).toMatch(/^Signed off/)
    const audit = await db('audit_events').where({ action: 'review.signed_off', lab_id: team.lab.id }).first()
    expect(audit.details.hash).toBe(state.coveringSignOff.hash)
    // A closed request cannot be decided again.
    const again = await postAs(
      app,
      team.cookies.biostatistician,
      `/api/v1/review-requests/${requestId}/decision`,
      { decision: 'changes_requested' },
    )
    expect(again.status).toBe(409)
  })

  it('covers that version only: a newer version shows the earlier sign-off as not covering it', async () => {
    const versionNo = await newVersion(team.cookies.scientist)
    const res = await getAs(app, team.cookies.pi, `${base()}/versions/${versionNo}/sign-off`)
    expect(res.status).toBe(200)
    expect(res.body.data.signedOff).toBe(false)
    expect(res.body.data.coveringSignOff).toBeNull()
    expect(res.body.data.earlierSignOffs).toHaveLength(1)
    expect(res.body.data.earlierSignOffs[0]).toMatchObject({ versionNo: 1, hashValid: true })
    const v1 = await getAs(app, team.cookies.pi, `${base()}/versions/1/sign-off`)
    expect(v1.body.data.signedOff).toBe(true)
  }, 60_000)

  it('flags a sign-off whose version result was changed afterwards', async () => {
    const versionNo = await newVersion(team.cookies.scientist)
    const req = await requestReview(team.cookies.scientist, versionNo, bio2.id)
    const signed = await postAs(app, bio2.cookie, `/api/v1/review-requests/${req.body.data.id}/decision`, {
      decision: 'signed_off',
    })
    expect(signed.body.data.signOff.signedOff).toBe(true)
    // Finished versions are frozen by a trigger; tampering has to go around it, as an attacker with
    // database access would.
    await db.transaction(async (trx) => {
      await trx.raw('SET LOCAL session_replication_role = replica')
      await trx.raw(
        `UPDATE analysis_versions SET result = jsonb_set(result, '{effectiveN}', to_jsonb((result->>'effectiveN')::float8 + 1)) WHERE analysis_id = ? AND version_no = ?`,
        [analysisId, versionNo],
      )
    })
    const res = await getAs(app, team.cookies.pi, `${base()}/versions/${versionNo}/sign-off`)
    expect(res.body.data.signedOff).toBe(false)
    expect(res.body.data.tampered).toHaveLength(1)
    expect(res.body.data.tampered[0]).toMatchObject({ hashValid: false, signedBy: { id: bio2.id } })
  }, 60_000)

  it('lets nobody sign off their own analysis', async () => {
    // The author becomes a biostatistician of the lab later on. The request is written straight into
    // the table (the API refuses it), so the rule is checked at the decision as well.
    const versionNo = await newVersion(team.cookies.scientist)
    const versionId = (
      await db('analysis_versions').where({ analysis_id: analysisId, version_no: versionNo }).first('id')
    ).id
    const [request] = await db('review_requests')
      .insert({
        analysis_version_id: versionId,
        requested_by: team.scientist.id,
        reviewer_id: team.scientist.id,
      })
      .returning('id')
    await db('memberships')
      .where({ user_id: team.scientist.id, lab_id: team.lab.id })
      .update({ role: 'biostatistician' })
    try {
      const selfCookie = await signIn(app, team.scientist.email, team.scientist.password)
      const res = await postAs(app, selfCookie, `/api/v1/review-requests/${request.id}/decision`, {
        decision: 'signed_off',
      })
      expect(res.status).toBe(403)
      expect(res.body.error.message).toMatch(/own analysis/)
      // and the author is never offered as reviewer
      const state = await getAs(app, selfCookie, `${base()}/versions/${versionNo}/review`)
      expect(state.body.data.reviewers.map((r: { id: number }) => r.id)).not.toContain(team.scientist.id)
      expect((await requestReview(team.cookies.pi, versionNo, team.scientist.id)).status).toBe(400)
    } finally {
      await db('memberships')
        .where({ user_id: team.scientist.id, lab_id: team.lab.id })
        .update({ role: 'scientist' })
    }
  }, 60_000)

  it('records a request for changes, mails the requester and audits it', async () => {
    const versionNo = await newVersion(team.cookies.scientist)
    const req = await requestReview(team.cookies.pi, versionNo, team.biostatistician.id)
    const res = await postAs(
      app,
      team.cookies.biostatistician,
      `/api/v1/review-requests/${req.body.data.id}/decision`,
      {
        decision: 'changes_requested',
        comment: 'Please exclude the damaged coverslip first.',
      },
    )
    expect(res.status).toBe(200)
    expect(res.body.data.request.status).toBe('changes_requested')
    expect(res.body.data.signOff.signedOff).toBe(false)
    const mail = await latestOutboxRowTo(team.pi.email)
    expect(mail.subject).toMatch(/^Changes requested/)
    expect(mail.text_body).toContain('damaged coverslip')
    const audit = await db('audit_events')
      .where({ action: 'review.changes_requested', subject_id: String(req.body.data.id) })
      .first()
    expect(audit).toBeTruthy()
  }, 60_000)

  it('lets the requester withdraw an open request, and nobody decide it afterwards', async () => {
    const newest = await db('analysis_versions')
      .where({ analysis_id: analysisId })
      .max('version_no as max')
      .first()
    const versionNo = Number(newest?.max)
    const req = await requestReview(team.cookies.scientist, versionNo, bio2.id)
    expect(req.status).toBe(201)
    expect(
      (
        await postAs(
          app,
          team.cookies.biostatistician,
          `/api/v1/review-requests/${req.body.data.id}/withdraw`,
        )
      ).status,
    ).toBe(403)
    const res = await postAs(
      app,
      team.cookies.scientist,
      `/api/v1/review-requests/${req.body.data.id}/withdraw`,
    )
    expect(res.body.data.status).toBe('withdrawn')
    expect(
      (
        await postAs(app, bio2.cookie, `/api/v1/review-requests/${req.body.data.id}/decision`, {
          decision: 'signed_off',
        })
      ).status,
    ).toBe(409)
  })
})

describe('rolling back', () => {
  it('leaves no request and no mail when the transaction fails', async () => {
    const before = await db('mail_outbox')
      .where({ to_address: bio2.email })
      .count<{ count: string }[]>('id as count')
    // An unknown reviewer id fails inside the transaction before anything is written.
    expect((await requestReview(team.cookies.scientist, 1, 999_999_999)).status).toBe(400)
    const after = await db('mail_outbox')
      .where({ to_address: bio2.email })
      .count<{ count: string }[]>('id as count')
    expect(after[0].count).toBe(before[0].count)
  })
})
