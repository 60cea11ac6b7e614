import { z } from 'zod'
import { Email, Role } from './auth'

export const LabSummary = z.object({
  id: z.number().int().positive(),
  name: z.string(),
  slug: z.string(),
  memberCount: z.number().int().nonnegative(),
  /** The caller's own role in the lab; null when an admin sees a lab they do not belong to. */
  myRole: Role.nullable(),
})
export type LabSummary = z.infer<typeof LabSummary>

export const LabMember = z.object({
  userId: z.number().int().positive(),
  name: z.string(),
  email: z.string(),
  role: Role,
})
export type LabMember = z.infer<typeof LabMember>

export const LabIdParams = z.object({
  labId: z.coerce.number().int().positive(),
})
export type LabIdParams = z.infer<typeof LabIdParams>

export const LabName = z
  .string()
  .trim()
  .min(2, { error: 'Use at least 2 characters' })
  .max(120, { error: 'Use at most 120 characters' })

/** Admins create labs; naming a first PI sends them an invitation in the same step. */
export const LabCreate = z.object({
  name: LabName,
  firstPiEmail: Email.optional(),
})
export type LabCreate = z.infer<typeof LabCreate>

export const MemberParams = z.object({
  labId: z.coerce.number().int().positive(),
  userId: z.coerce.number().int().positive(),
})
export type MemberParams = z.infer<typeof MemberParams>

export const MemberRoleUpdate = z.object({ role: Role })
export type MemberRoleUpdate = z.infer<typeof MemberRoleUpdate>
