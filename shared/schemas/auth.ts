import { z } from 'zod'

/** A person's role inside one lab. Instance administration is a separate flag (`isAdmin`). */
export const Role = z.enum(['scientist', 'pi', 'biostatistician'])
export type Role = z.infer<typeof Role>

// Emails are compared lower-cased everywhere, so normalise before the format check.
export const Email = z
  .string()
  .trim()
  .toLowerCase()
  .max(254)
  .pipe(z.email({ error: 'Enter a valid email address' }))

export const LoginRequest = z.object({
  email: Email,
  password: z.string().min(1, { error: 'Enter your password' }).max(200),
})
export type LoginRequest = z.infer<typeof LoginRequest>

export const Membership = z.object({
  labId: z.number().int().positive(),
  labName: z.string(),
  role: Role,
})
export type Membership = z.infer<typeof Membership>

export const CurrentUser = z.object({
  id: z.number().int().positive(),
  email: z.string(),
  name: z.string(),
  isAdmin: z.boolean(),
  memberships: z.array(Membership),
})
export type CurrentUser = z.infer<typeof CurrentUser>
