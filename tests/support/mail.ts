import { db } from '../../server/db'
import { startFakeSmtpServer, type RunningFakeSmtpServer } from '../../server/mail/fake-smtp-server'
import { createMailSender, type MailSender, type MailSenderOptions } from '../../server/mail/mail-sender'
import { createMailTransport } from '../../server/mail/transport'
import { findReceivedMail, type ReceivedMailRecord } from '../../server/repositories/received-mails.repo'

export interface TestMail {
  fake: RunningFakeSmtpServer
  sender: MailSender
  stop(): Promise<void>
}

/** A fake SMTP server on a free loopback port and a fast-polling sender delivering to it. */
export async function startTestMail(options: Partial<MailSenderOptions> = {}): Promise<TestMail> {
  const fake = await startFakeSmtpServer({ port: 0 })
  const sender = createMailSender({
    transport: createMailTransport({ mode: 'fake', host: '127.0.0.1', port: fake.port }),
    from: 'Nestwise tests <tests@nestwise.invalid>',
    pollIntervalMs: 100,
    retryDelayMs: () => 0,
    ...options,
  })
  return {
    fake,
    sender,
    async stop() {
      await sender.stop()
      await fake.close()
    },
  }
}

/** Polls `probe` until it returns something truthy, or fails after `timeoutMs`. */
export async function waitFor<T>(
  probe: () => Promise<T | undefined | null | false>,
  timeoutMs = 10_000,
  what = 'condition',
): Promise<T> {
  const deadline = Date.now() + timeoutMs
  for (;;) {
    const value = await probe()
    if (value) return value
    if (Date.now() > deadline) throw new Error(`timed out waiting for ${what}`)
    await new Promise((resolve) => setTimeout(resolve, 50))
  }
}

/** The newest message the fake SMTP server received for this address. */
export async function latestReceivedMailTo(address: string): Promise<ReceivedMailRecord | undefined> {
  const row: { id: number } | undefined = await db('received_mails')
    .whereRaw('? = ANY(envelope_to)', [address])
    .orderBy('id', 'desc')
    .first('id')
  return row ? findReceivedMail(row.id) : undefined
}

/** The newest outbox row for this address (any status). */
export async function latestOutboxRowTo(address: string) {
  return db('mail_outbox').where({ to_address: address }).orderBy('id', 'desc').first()
}

/** The invitation token inside an e-mailed link (…/join#TOKEN). */
export function invitationTokenIn(text: string): string {
  const match = /\/join#([A-Za-z0-9_-]{43})/.exec(text)
  if (!match) throw new Error(`no invitation link in:\n${text}`)
  return match[1]
}
