import { z } from 'zod'
import { Membership } from './auth'

/** A user as instance administrators see it in the people overview. */
export const AdminUserListItem = z.object({
  id: z.number().int().positive(),
  email: z.string(),
  name: z.string(),
  isAdmin: z.boolean(),
  createdAt: z.string(),
  memberships: z.array(Membership),
})
export type AdminUserListItem = z.infer<typeof AdminUserListItem>
