import type { Knex } from 'knex'
import type { OutgoingMail } from '../mail/outgoing-mail'
import { signalMailQueued } from '../mail/outbox-signal'
import type { Conn } from '../repositories/connection'
import { insertOutboxMessage } from '../repositories/mail-outbox.repo'

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
