import { z } from 'zod'
import { Role } from './auth'

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
