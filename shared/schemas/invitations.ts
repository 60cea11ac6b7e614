import { z } from 'zod'
import { CurrentUser, Email, Role } from './auth'

/** Lab membership is granted through e-mailed, single-use invitations that expire after 7 days. */
export const INVITATION_VALID_DAYS = 7

export const NewPassword = z
  .string()
  .min(10, { error: 'Use at least 10 characters' })
  .max(200, { error: 'Use at most 200 characters' })

export const PersonName = z
  .string()
  .trim()
  .min(1, { error: 'Enter your name' })
  .max(120, { error: 'Use at most 120 characters' })

export const InvitationCreate = z.object({ email: Email, role: Role })
export type InvitationCreate = z.infer<typeof InvitationCreate>

export const InvitationStatus = z.enum(['pending', 'expired', 'accepted', 'revoked'])
export type InvitationStatus = z.infer<typeof InvitationStatus>

export const InvitationSummary = z.object({
  id: z.number().int().positive(),
  labId: z.number().int().positive(),
  email: z.string(),
  role: Role,
  status: InvitationStatus,
  createdAt: z.string(),
  expiresAt: z.string(),
  invitedBy: z.object({ id: z.number().int().positive(), name: z.string() }).nullable(),
})
export type InvitationSummary = z.infer<typeof InvitationSummary>

// 32 random bytes in base64url: 43 characters. Anything else cannot be one of ours.
export const InvitationToken = z
  .string()
  .regex(/^[A-Za-z0-9_-]{43}$/, { error: 'This invitation link is not complete.' })

/** The token travels in the body (never in a URL the server logs). */
export const InvitationTokenBody = z.object({ token: InvitationToken })
export type InvitationTokenBody = z.infer<typeof InvitationTokenBody>

/** What the landing page shows before the invitee accepts. */
export const InvitationPreview = z.object({
  labName: z.string(),
  role: Role,
  email: z.string(),
  invitedByName: z.string().nullable(),
  expiresAt: z.string(),
  /** true: the invitee signs in with their existing password instead of creating an account. */
  accountExists: z.boolean(),
})
export type InvitationPreview = z.infer<typeof InvitationPreview>

/**
 * Accepting: a new person sends a name and a password; someone with an account sends their
 * password, or nothing when already signed in as the invited address.
 */
export const InvitationAccept = z.object({
  token: InvitationToken,
  name: PersonName.optional(),
  password: z.string().max(200).optional(),
})
export type InvitationAccept = z.infer<typeof InvitationAccept>

export const InvitationAcceptResult = z.object({
  user: CurrentUser,
  labId: z.number().int().positive(),
  labName: z.string(),
  role: Role,
})
export type InvitationAcceptResult = z.infer<typeof InvitationAcceptResult>

export const InvitationParams = z.object({
  labId: z.coerce.number().int().positive(),
  invitationId: z.coerce.number().int().positive(),
})
export type InvitationParams = z.infer<typeof InvitationParams>
