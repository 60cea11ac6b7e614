import { defaultConn, type Conn } from './connection'

export interface NewReceivedMail {
  envelopeFrom: string | null
  envelopeTo: string[]
  messageId: string | null
  from: string | null
  to: string | null
  subject: string | null
  text: string | null
  html: string | null
  raw: string
}

export interface ReceivedMailRecord extends NewReceivedMail {
  id: number
  receivedAt: Date
}

interface ReceivedRow {
  id: number
  received_at: Date
  envelope_from: string | null
  envelope_to: string[]
  message_id: string | null
  from_header: string | null
  to_header: string | null
  subject: string | null
  text_body: string | null
  html_body: string | null
  raw: string
}

function toRecord(row: ReceivedRow): ReceivedMailRecord {
  return {
    id: row.id,
    receivedAt: row.received_at,
    envelopeFrom: row.envelope_from,
    envelopeTo: row.envelope_to,
    messageId: row.message_id,
    from: row.from_header,
    to: row.to_header,
    subject: row.subject,
    text: row.text_body,
    html: row.html_body,
    raw: row.raw,
  }
}

export async function insertReceivedMail(mail: NewReceivedMail, conn: Conn = defaultConn): Promise<number> {
  const [row]: { id: number }[] = await conn('received_mails')
    .insert({
      envelope_from: mail.envelopeFrom,
      envelope_to: mail.envelopeTo,
      message_id: mail.messageId,
      from_header: mail.from,
      to_header: mail.to,
      subject: mail.subject,
      text_body: mail.text,
      html_body: mail.html,
      raw: mail.raw,
    })
    .returning('id')
  return row.id
}

export async function findReceivedMail(
  id: number,
  conn: Conn = defaultConn,
): Promise<ReceivedMailRecord | undefined> {
  const row: ReceivedRow | undefined = await conn('received_mails').where({ id }).first()
  return row ? toRecord(row) : undefined
}

export async function listReceivedMailsByMessageId(
  messageId: string,
  conn: Conn = defaultConn,
): Promise<ReceivedMailRecord[]> {
  const rows: ReceivedRow[] = await conn('received_mails').where({ message_id: messageId }).orderBy('id')
  return rows.map(toRecord)
}

export async function listReceivedMails(
  page: { offset: number; limit: number },
  conn: Conn = defaultConn,
): Promise<{ items: ReceivedMailRecord[]; total: number }> {
  const [{ total }] = await conn('received_mails').count<{ total: number }[]>('* as total')
  const rows: ReceivedRow[] = await conn('received_mails')
    .orderBy([
      { column: 'received_at', order: 'desc' },
      { column: 'id', order: 'desc' },
    ])
    .offset(page.offset)
    .limit(page.limit)
  return { total: Number(total), items: rows.map(toRecord) }
}
