import type { Knex } from 'knex'
import type { MailKind } from '../../shared/schemas/mail'
import { signalMailQueued } from '../mail/outbox-signal'
import type { Conn } from '../repositories/connection'
import { insertOutboxMessage } from '../repositories/mail-outbox.repo'

export interface OutgoingMail {
  to: string
  subject: string
  text: string
  html?: string
  kind: MailKind
}

function isTransaction(conn: Conn): conn is Knex.Transaction {
  return (conn as Knex.Transaction).isTransaction === true
}

/**
 * Queues a message in the outbox inside the caller's transaction: if the business change rolls
 * back, so does the message. The sender loop is nudged only once the transaction has committed.
 */
export async function enqueueMail(trx: Conn, mail: OutgoingMail): Promise<number> {
  const id = await insertOutboxMessage(mail, trx)
  if (isTransaction(trx)) {
    trx.executionPromise.then(signalMailQueued, () => {
      /* rolled back: nothing to send */
    })
  } else {
    signalMailQueued()
  }
  return id
}
