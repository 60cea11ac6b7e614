import type { OutboxStatus } from '../../shared/schemas/mail'
import { defaultConn, type Conn } from './connection'

export interface NewOutboxMessage {
  to: string
  subject: string
  text: string
  html?: string | null
  kind: string
}

export interface OutboxRecord {
  id: number
  to: string
  subject: string
  text: string
  html: string | null
  kind: string
  status: OutboxStatus
  attempts: number
  lastError: string | null
  nextAttemptAt: Date
  messageId: string | null
  createdAt: Date
  sentAt: Date | null
}

interface OutboxRow {
  id: number
  to_address: string
  subject: string
  text_body: string
  html_body: string | null
  kind: string
  status: OutboxStatus
  attempts: number
  last_error: string | null
  next_attempt_at: Date
  message_id: string | null
  created_at: Date
  sent_at: Date | null
}

function toRecord(row: OutboxRow): OutboxRecord {
  return {
    id: row.id,
    to: row.to_address,
    subject: row.subject,
    text: row.text_body,
    html: row.html_body,
    kind: row.kind,
    status: row.status,
    attempts: row.attempts,
    lastError: row.last_error,
    nextAttemptAt: row.next_attempt_at,
    messageId: row.message_id,
    createdAt: row.created_at,
    sentAt: row.sent_at,
  }
}

export async function insertOutboxMessage(
  message: NewOutboxMessage,
  conn: Conn = defaultConn,
): Promise<number> {
  const [row]: { id: number }[] = await conn('mail_outbox')
    .insert({
      to_address: message.to,
      subject: message.subject,
      text_body: message.text,
      html_body: message.html ?? null,
      kind: message.kind,
    })
    .returning('id')
  return row.id
}

/**
 * The oldest due queued message, locked for this transaction. SKIP LOCKED lets several senders
 * (or processes) work side by side: each takes a message nobody else is holding.
 */
export async function lockNextDueMessage(trx: Conn): Promise<OutboxRecord | undefined> {
  const row: OutboxRow | undefined = await trx('mail_outbox')
    .where('status', 'queued')
    .andWhere('next_attempt_at', '<=', trx.fn.now())
    .orderBy([{ column: 'next_attempt_at' }, { column: 'id' }])
    .first()
    .forUpdate()
    .skipLocked()
  return row ? toRecord(row) : undefined
}

export async function markOutboxSent(id: number, messageId: string | null, conn: Conn): Promise<void> {
  await conn('mail_outbox')
    .where({ id })
    .update({
      status: 'sent',
      attempts: conn.raw('attempts + 1'),
      last_error: null,
      message_id: messageId,
      sent_at: conn.fn.now(),
    })
}

/** Records a failed attempt: queued again at `retryAt`, or failed for good when retryAt is null. */
export async function markOutboxAttemptFailed(
  id: number,
  error: string,
  retryAt: Date | null,
  conn: Conn,
): Promise<void> {
  await conn('mail_outbox')
    .where({ id })
    .update({
      status: retryAt ? 'queued' : 'failed',
      attempts: conn.raw('attempts + 1'),
      last_error: error.slice(0, 2000),
      ...(retryAt ? { next_attempt_at: retryAt } : {}),
    })
}

/** A failed message goes back to the queue, due at once, with a fresh count of attempts. */
export async function requeueFailedMessage(id: number, conn: Conn = defaultConn): Promise<boolean> {
  const count = await conn('mail_outbox')
    .where({ id, status: 'failed' })
    .update({ status: 'queued', attempts: 0, next_attempt_at: conn.fn.now() })
  return count === 1
}

export async function findOutboxMessage(
  id: number,
  conn: Conn = defaultConn,
): Promise<OutboxRecord | undefined> {
  const row: OutboxRow | undefined = await conn('mail_outbox').where({ id }).first()
  return row ? toRecord(row) : undefined
}

export interface OutboxListItem extends OutboxRecord {
  receivedMailId: number | null
}

export async function listOutbox(
  filter: { status?: OutboxStatus; id?: number },
  page: { offset: number; limit: number },
  conn: Conn = defaultConn,
): Promise<{ items: OutboxListItem[]; total: number }> {
  const base = () => {
    const q = conn('mail_outbox as o')
    if (filter.status) q.where('o.status', filter.status)
    if (filter.id !== undefined) q.where('o.id', filter.id)
    return q
  }
  const [{ total }] = await base().count<{ total: number }[]>('* as total')
  // The fake SMTP server keeps the Message-ID header; nodemailer reports the same id on sending.
  const received = conn('received_mails')
    .select('message_id')
    .min('id as received_id')
    .groupBy('message_id')
    .as('r')
  const rows: (OutboxRow & { received_id: number | null })[] = await base()
    .leftJoin(received, 'r.message_id', 'o.message_id')
    .select('o.*', 'r.received_id')
    .orderBy([
      { column: 'o.created_at', order: 'desc' },
      { column: 'o.id', order: 'desc' },
    ])
    .offset(page.offset)
    .limit(page.limit)
  return { total: Number(total), items: rows.map((r) => ({ ...toRecord(r), receivedMailId: r.received_id })) }
}
