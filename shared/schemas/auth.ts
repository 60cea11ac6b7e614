import { z } from 'zod'

/** A person's role inside one lab. Instance administration is a separate flag (`isAdmin`). */
export const Role = z.enum(['scientist', 'pi', 'biostatistician'])
export type Role = z.infer<typeof Role>

/**
 * An e-mail address, internationalised ones included (RFC 6531: `jörg@example.org`, a domain in
 * any script such as `müller.de`, or its xn-- form). The local part has no spaces, quotes, angle
 * brackets or control characters, and no leading, trailing or doubled dot; the domain is labels of
 * letters, digits and hyphens, the last of two or more letters (or xn-- punycode).
 */
const LOCAL_CHAR = '[^\\s@"(),:;<>\\[\\]\\\\.\\u0000-\\u001f\\u007f]'
const LABEL = '[\\p{L}\\p{N}](?:[\\p{L}\\p{N}-]{0,61}[\\p{L}\\p{N}])?'
export const EMAIL_PATTERN = new RegExp(
  `^${LOCAL_CHAR}+(?:\\.${LOCAL_CHAR}+)*@(?:${LABEL}\\.)+(?:\\p{L}{2,}|xn--[a-z0-9-]{2,})$`,
  'u',
)

// Emails are compared lower-cased everywhere (and in one Unicode form), so normalise before the check.
export const Email = z
  .string()
  .trim()
  .normalize('NFC')
  .toLowerCase()
  .max(254)
  .pipe(z.email({ pattern: EMAIL_PATTERN, error: 'Enter a valid email address' }))

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
