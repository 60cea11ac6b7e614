import { z } from 'zod'

export const MailKind = z.enum(['invitation', 'review_request', 'review_decision', 'share_link'])
export type MailKind = z.infer<typeof MailKind>

export const OutboxStatus = z.enum(['queued', 'sent', 'failed'])
export type OutboxStatus = z.infer<typeof OutboxStatus>

export const OutboxMessage = z.object({
  id: z.number().int().positive(),
  to: z.string(),
  subject: z.string(),
  kind: z.string(),
  status: OutboxStatus,
  attempts: z.number().int().nonnegative(),
  lastError: z.string().nullable(),
  createdAt: z.string(),
  nextAttemptAt: z.string(),
  sentAt: z.string().nullable(),
  messageId: z.string().nullable(),
  /** The copy the local fake SMTP server received, when it did. */
  receivedMailId: z.number().int().positive().nullable(),
})
export type OutboxMessage = z.infer<typeof OutboxMessage>

export const ReceivedMailSummary = z.object({
  id: z.number().int().positive(),
  receivedAt: z.string(),
  envelopeTo: z.array(z.string()),
  from: z.string().nullable(),
  subject: z.string().nullable(),
  messageId: z.string().nullable(),
})
export type ReceivedMailSummary = z.infer<typeof ReceivedMailSummary>

export const ReceivedMail = ReceivedMailSummary.extend({
  to: z.string().nullable(),
  text: z.string().nullable(),
  html: z.string().nullable(),
  raw: z.string(),
})
export type ReceivedMail = z.infer<typeof ReceivedMail>

export const MailListQuery = z.object({
  status: OutboxStatus.optional(),
  page: z.coerce.number().int().positive().default(1),
  pageSize: z.coerce.number().int().min(1).max(200).default(50),
})
export type MailListQuery = z.infer<typeof MailListQuery>

export function pageOf<T extends z.ZodType>(item: T) {
  return z.object({
    items: z.array(item),
    total: z.number().int().nonnegative(),
    page: z.number().int().positive(),
    pageSize: z.number().int().positive(),
  })
}

export const OutboxPage = pageOf(OutboxMessage)
export type OutboxPage = z.infer<typeof OutboxPage>
export const ReceivedMailPage = pageOf(ReceivedMailSummary)
export type ReceivedMailPage = z.infer<typeof ReceivedMailPage>

export const MailIdParams = z.object({ mailId: z.coerce.number().int().positive() })
export type MailIdParams = z.infer<typeof MailIdParams>

/** How the server delivers mail, for the admin page's header. */
export const MailDelivery = z.object({
  mode: z.enum(['fake', 'smtp']),
  host: z.string(),
  port: z.number().int().positive(),
  from: z.string(),
})
export type MailDelivery = z.infer<typeof MailDelivery>
