import type { MailKind } from '../../shared/schemas/mail'

/** A message as the templates write it and the outbox queues it. */
export interface OutgoingMail {
  to: string
  subject: string
  text: string
  html?: string
  kind: MailKind
}
