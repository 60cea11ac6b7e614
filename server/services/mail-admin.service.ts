import type { CurrentUser } from '../../shared/schemas/auth'
import type {
  MailDelivery,
  MailListQuery,
  OutboxMessage,
  OutboxPage,
  ReceivedMail,
  ReceivedMailPage,
} from '../../shared/schemas/mail'
import { db } from '../db'
import { ConflictError, NotFoundError } from '../errors/app-error'
import { mailSettings } from '../mail/mail-settings'
import { signalMailQueued } from '../mail/outbox-signal'
import {
  findOutboxMessage,
  listOutbox,
  requeueFailedMessage,
  type OutboxListItem,
} from '../repositories/mail-outbox.repo'
import {
  findReceivedMail,
  listReceivedMails,
  type ReceivedMailRecord,
} from '../repositories/received-mails.repo'
import { recordAudit } from './audit.service'

function toOutboxMessage(item: OutboxListItem): OutboxMessage {
  return {
    id: item.id,
    to: item.to,
    subject: item.subject,
    kind: item.kind,
    status: item.status,
    attempts: item.attempts,
    lastError: item.lastError,
    createdAt: item.createdAt.toISOString(),
    nextAttemptAt: item.nextAttemptAt.toISOString(),
    sentAt: item.sentAt?.toISOString() ?? null,
    messageId: item.messageId,
    receivedMailId: item.receivedMailId,
  }
}

function summaryOf(mail: ReceivedMailRecord) {
  return {
    id: mail.id,
    receivedAt: mail.receivedAt.toISOString(),
    envelopeTo: mail.envelopeTo,
    from: mail.from,
    subject: mail.subject,
    messageId: mail.messageId,
  }
}

const pageWindow = (q: { page: number; pageSize: number }) => ({
  offset: (q.page - 1) * q.pageSize,
  limit: q.pageSize,
})

export function mailDelivery(): MailDelivery {
  const { mode, host, port, from } = mailSettings()
  return { mode, host, port, from }
}

export async function listOutboxPage(query: MailListQuery): Promise<OutboxPage> {
  const { items, total } = await listOutbox({ status: query.status }, pageWindow(query))
  return { items: items.map(toOutboxMessage), total, page: query.page, pageSize: query.pageSize }
}

export async function listReceivedPage(query: MailListQuery): Promise<ReceivedMailPage> {
  const { items, total } = await listReceivedMails(pageWindow(query))
  return { items: items.map(summaryOf), total, page: query.page, pageSize: query.pageSize }
}

export async function getReceivedMail(id: number): Promise<ReceivedMail> {
  const mail = await findReceivedMail(id)
  if (!mail) throw new NotFoundError('No such received message.')
  return { ...summaryOf(mail), to: mail.to, text: mail.text, html: mail.html, raw: mail.raw }
}

/** Puts a message that failed for good back in the queue (after fixing the mail settings, say). */
export async function retryOutboxMessage(admin: CurrentUser, id: number): Promise<OutboxMessage> {
  await db.transaction(async (trx) => {
    const message = await findOutboxMessage(id, trx)
    if (!message) throw new NotFoundError('No such outbox message.')
    if (!(await requeueFailedMessage(id, trx))) {
      throw new ConflictError('Only messages that failed can be sent again.', { status: message.status })
    }
    await recordAudit(trx, {
      action: 'mail.requeued',
      actorUserId: admin.id,
      subjectType: 'mail',
      subjectId: id,
      details: { to: message.to, kind: message.kind },
    })
  })
  signalMailQueued()
  const { items } = await listOutbox({ id }, { offset: 0, limit: 1 })
  return toOutboxMessage(items[0])
}
