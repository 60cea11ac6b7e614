import type { Transporter } from 'nodemailer'
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest'
import { db } from '../../server/db'
import { createMailSender } from '../../server/mail/mail-sender'
import { createMailTransport } from '../../server/mail/transport'
import { createInvitationIn } from '../../server/services/invitations.service'
import { enqueueMail } from '../../server/services/mail-outbox.service'
import { closeConnections, createTestApp, signIn } from '../support/api'
import { asUser } from '../support/as-user'
import { createLabWithTeam, createUser, uniqueEmail } from '../support/factories'
import {
  invitationTokenIn,
  latestReceivedMailTo,
  startTestMail,
  waitFor,
  type TestMail,
} from '../support/mail'

const app = createTestApp()
let mail: TestMail
const extraStops: (() => Promise<void>)[] = []

/** Sends what earlier test files left queued, so each test here sees only its own messages. */
async function drainLeftovers() {
  while ((await mail.sender.runOnce()) > 0);
}

beforeAll(async () => {
  mail = await startTestMail()
  await drainLeftovers()
})
afterEach(async () => {
  for (const stop of extraStops.splice(0)) await stop()
})
afterAll(async () => {
  await mail.stop()
  await closeConnections()
})

const outboxRow = (id: number) => db('mail_outbox').where({ id }).first()

function message(to: string, subject = `Test message ${to}`) {
  return {
    to,
    subject,
    text: `Hello ${to}\nhttp://127.0.0.1/join#${'x'.repeat(43)}`,
    kind: 'invitation' as const,
  }
}

/** Runs the sender until `id` is no longer queued-and-due (other files' leftovers may come first). */
async function drainUntilDone(sender: { runOnce(): Promise<number> }, id: number) {
  return waitFor(
    async () => {
      await sender.runOnce()
      const row = await outboxRow(id)
      return row.status !== 'queued' || row.next_attempt_at > new Date() ? row : undefined
    },
    10_000,
    `outbox message ${id}`,
  )
}

describe('enqueueing inside the business transaction', () => {
  it('rolls the message back with the transaction', async () => {
    const to = uniqueEmail('rolled-back')
    await expect(
      db.transaction(async (trx) => {
        await enqueueMail(trx, message(to))
        throw new Error('the business change failed')
      }),
    ).rejects.toThrow('the business change failed')
    expect(await db('mail_outbox').where({ to_address: to })).toEqual([])
  })

  it('rolls back an invitation together with its e-mail', async () => {
    const { lab, pi } = await createLabWithTeam()
    const email = uniqueEmail('never-invited')
    const inviter = { id: pi.id, email: pi.email, name: pi.name, isAdmin: false, memberships: [] }
    await expect(
      db.transaction(async (trx) => {
        await createInvitationIn(trx, inviter, lab, { email, role: 'scientist' })
        throw new Error('later step failed')
      }),
    ).rejects.toThrow('later step failed')
    expect(await db('invitations').where({ email })).toEqual([])
    expect(await db('mail_outbox').where({ to_address: email })).toEqual([])
    expect(await db('audit_events').where({ lab_id: lab.id })).toEqual([])
  })

  it('is invisible to the sender until commit, then delivered to the fake SMTP server without waiting for a poll', async () => {
    await mail.sender.stop()
    const to = uniqueEmail('after-commit')
    // A sender that polls rarely: delivery within the wait below can only come from the commit signal.
    const slow = createMailSender({
      transport: createMailTransport({ mode: 'fake', host: '127.0.0.1', port: mail.fake.port }),
      from: 'Nestwise tests <tests@nestwise.invalid>',
      pollIntervalMs: 60_000,
    })
    let id = 0
    await db.transaction(async (trx) => {
      id = await enqueueMail(trx, message(to, 'Sent after commit'))
      // Another connection cannot see the uncommitted row.
      await slow.runOnce()
      expect(await db('mail_outbox').where({ id })).toEqual([])
      slow.start()
    })
    extraStops.push(() => slow.stop())
    const received = await waitFor(() => latestReceivedMailTo(to), 10_000, 'the received copy')
    expect(received.subject).toBe('Sent after commit')
    expect(received.text).toContain(`/join#${'x'.repeat(43)}`)
    expect(received.envelopeFrom).toBe('tests@nestwise.invalid')
    const row = await waitFor(async () =>
      (await outboxRow(id)).status === 'sent' ? outboxRow(id) : undefined,
    )
    expect(row).toMatchObject({
      status: 'sent',
      attempts: 1,
      last_error: null,
      message_id: received.messageId,
    })
    expect(row.sent_at).toBeInstanceOf(Date)
  })
})

describe('the sender loop', () => {
  function flakyTransport(failures: number) {
    const real = createMailTransport({ mode: 'fake', host: '127.0.0.1', port: mail.fake.port })
    let calls = 0
    const transport = {
      sendMail: (async (options: Parameters<Transporter['sendMail']>[0]) => {
        calls += 1
        if (calls <= failures) throw Object.assign(new Error('Connection refused'), { code: 'ECONNREFUSED' })
        return real.sendMail(options)
      }) as Transporter['sendMail'],
    }
    return { transport, calls: () => calls }
  }

  it('retries a failed delivery and succeeds on a later attempt', async () => {
    await drainLeftovers()
    const to = uniqueEmail('retry')
    const id = await enqueueMail(db, message(to))
    const flaky = flakyTransport(2)
    const sender = createMailSender({
      transport: flaky.transport,
      from: 'tests@nestwise.invalid',
      retryDelayMs: () => 0,
      batchSize: 1,
    })
    let row = await drainUntilDone(sender, id)
    // Each run attempts once (batch of one): the loop above re-runs until the message left the queue.
    expect(row).toMatchObject({ status: 'sent', attempts: 3, last_error: null })
    expect(flaky.calls()).toBeGreaterThanOrEqual(3)
    row = await outboxRow(id)
    expect((await latestReceivedMailTo(to))?.messageId).toBe(row.message_id)
  })

  it('waits for the backoff before trying again, and gives up after the last attempt', async () => {
    const to = uniqueEmail('gives-up')
    const id = await enqueueMail(db, message(to))
    await db('mail_outbox')
      .where('status', 'queued')
      .whereNot({ id })
      .update({ next_attempt_at: db.raw("now() + interval '1 hour'") })
    const failing = flakyTransport(Number.POSITIVE_INFINITY)
    const backoff = createMailSender({
      transport: failing.transport,
      from: 'tests@nestwise.invalid',
      maxAttempts: 3,
      retryDelayMs: () => 60_000,
    })
    await backoff.runOnce()
    let row = await outboxRow(id)
    expect(row).toMatchObject({
      status: 'queued',
      attempts: 1,
      last_error: 'ECONNREFUSED: Connection refused',
    })
    expect(row.next_attempt_at.getTime() - Date.now()).toBeGreaterThan(50_000)
    await backoff.runOnce()
    expect((await outboxRow(id)).attempts).toBe(1)

    const impatient = createMailSender({
      transport: failing.transport,
      from: 'tests@nestwise.invalid',
      maxAttempts: 3,
      retryDelayMs: () => 0,
    })
    await db('mail_outbox').where({ id }).update({ next_attempt_at: db.fn.now() })
    await impatient.runOnce()
    row = await outboxRow(id)
    expect(row).toMatchObject({ status: 'failed', attempts: 3 })
    await impatient.runOnce()
    expect((await outboxRow(id)).attempts).toBe(3)
    await db('mail_outbox')
      .where('status', 'queued')
      .whereNot({ id })
      .update({ next_attempt_at: db.fn.now() })
  })

  it('hands each message to exactly one of several senders running at once (SKIP LOCKED)', async () => {
    const prefix = `Parallel ${Date.now()}`
    const to = uniqueEmail('parallel')
    for (let i = 0; i < 8; i += 1) await enqueueMail(db, message(to, `${prefix} #${i}`))
    const transport = createMailTransport({ mode: 'fake', host: '127.0.0.1', port: mail.fake.port })
    const senders = [1, 2, 3].map(() =>
      createMailSender({ transport, from: 'tests@nestwise.invalid', batchSize: 100 }),
    )
    await Promise.all(senders.map((s) => s.runOnce()))
    const received: { subject: string }[] = await db('received_mails').where('subject', 'like', `${prefix}%`)
    expect(received.map((r) => r.subject).sort()).toEqual(
      Array.from({ length: 8 }, (_, i) => `${prefix} #${i}`).sort(),
    )
  })
})

describe('the admin outbox API', () => {
  it('shows admins the queue with the received copy, and lets them re-send a failed message', async () => {
    const admin = await createUser({ isAdmin: true })
    const { lab, pi } = await createLabWithTeam()
    const email = uniqueEmail('admin-view')
    const piApi = asUser(app, await signIn(app, pi.email, pi.password))
    expect(
      (await piApi.post(`/api/v1/labs/${lab.id}/invitations`, { email, role: 'scientist' })).status,
    ).toBe(201)
    mail.sender.start()
    const received = await waitFor(() => latestReceivedMailTo(email), 10_000, 'the invitation e-mail')
    await mail.sender.stop()

    const adminApi = asUser(app, await signIn(app, admin.email, admin.password))
    const outbox = await adminApi.get('/api/v1/admin/mail/outbox?pageSize=200')
    expect(outbox.status).toBe(200)
    const item = outbox.body.data.items.find((m: { to: string }) => m.to === email)
    expect(item).toMatchObject({
      kind: 'invitation',
      status: 'sent',
      attempts: 1,
      receivedMailId: received.id,
    })

    const copy = await adminApi.get(`/api/v1/admin/mail/received/${received.id}`)
    expect(copy.status).toBe(200)
    expect(copy.body.data.subject).toBe(`Invitation to join ${lab.name} on Nestwise`)
    const token = invitationTokenIn(copy.body.data.text)
    expect((await asUser(app).post('/api/v1/invitations/lookup', { token })).body.data.email).toBe(email)
    expect(copy.body.data.html).toContain('<a href=')

    const list = await adminApi.get('/api/v1/admin/mail/received?pageSize=5')
    expect(list.body.data.items[0]).toHaveProperty('subject')
    expect(list.body.data.total).toBeGreaterThanOrEqual(1)

    expect((await adminApi.post(`/api/v1/admin/mail/outbox/${item.id}/retry`)).status).toBe(409)
    await db('mail_outbox')
      .where({ id: item.id })
      .update({ status: 'failed', attempts: 5, last_error: 'gave up' })
    const retried = await adminApi.post(`/api/v1/admin/mail/outbox/${item.id}/retry`)
    expect(retried.status).toBe(200)
    expect(retried.body.data).toMatchObject({ status: 'queued', attempts: 0 })
    const failedOnly = await adminApi.get('/api/v1/admin/mail/outbox?status=failed&pageSize=200')
    expect(failedOnly.body.data.items.every((m: { status: string }) => m.status === 'failed')).toBe(true)

    expect((await piApi.get('/api/v1/admin/mail/outbox')).status).toBe(403)
    expect((await adminApi.get('/api/v1/admin/mail/received/999999999')).status).toBe(404)
  })
})
