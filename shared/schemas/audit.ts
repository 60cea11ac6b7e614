import { z } from 'zod'

/**
 * Every kind of entry the audit log knows. Names are `subject.verb_in_past_tense`; features add
 * theirs here so filters and screen labels know them.
 */
export const AuditAction = z.enum([
  'auth.signed_in',
  'auth.sign_in_failed',
  'auth.signed_out',
  'lab.created',
  'invitation.created',
  'invitation.accepted',
  'invitation.revoked',
  'member.role_changed',
  'member.removed',
  'mail.requeued',
  'dataset.uploaded',
  'dataset.version_added',
  'dataset.updated',
  'dataset.deleted',
  'dataset.restored',
  'dataset.tagging_changed',
  'dataset.exclusion_added',
  'dataset.exclusion_withdrawn',
  'project.created',
  'project.updated',
  'analysis.created',
  'analysis.version_created',
  'analysis.renamed',
  'review.requested',
  'review.commented',
  'review.signed_off',
  'review.changes_requested',
  'review.withdrawn',
  'share_link.created',
  'share_link.opened',
  'share_link.revoked',
  'plan.created',
  'plan.updated',
  'plan.deleted',
])
export type AuditAction = z.infer<typeof AuditAction>

export const AuditEvent = z.object({
  id: z.number().int().positive(),
  at: z.string(),
  actor: z.object({ id: z.number().int().positive(), name: z.string(), email: z.string() }).nullable(),
  labId: z.number().int().positive().nullable(),
  labName: z.string().nullable(),
  action: z.string(),
  subjectType: z.string().nullable(),
  subjectId: z.string().nullable(),
  details: z.record(z.string(), z.unknown()),
  requestId: z.string().nullable(),
  ip: z.string().nullable(),
})
export type AuditEvent = z.infer<typeof AuditEvent>

export const AuditQuery = z
  .object({
    action: AuditAction.optional(),
    actorId: z.coerce.number().int().positive().optional(),
    /** Admin view only; the lab view takes the lab from its path. */
    labId: z.coerce.number().int().positive().optional(),
    from: z.coerce.date().optional(),
    to: z.coerce.date().optional(),
    page: z.coerce.number().int().positive().default(1),
    pageSize: z.coerce.number().int().min(1).max(200).default(50),
  })
  .refine((q) => !q.from || !q.to || q.from <= q.to, { error: '“From” must not be after “to”', path: ['to'] })
export type AuditQuery = z.infer<typeof AuditQuery>

export const AuditPage = z.object({
  items: z.array(AuditEvent),
  total: z.number().int().nonnegative(),
  page: z.number().int().positive(),
  pageSize: z.number().int().positive(),
})
export type AuditPage = z.infer<typeof AuditPage>
