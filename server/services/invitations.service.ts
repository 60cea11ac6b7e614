import { INVITATION_VALID_DAYS, NewPassword, PersonName } from '../../shared/schemas/invitations'
import type {
  InvitationAccept,
  InvitationCreate,
  InvitationPreview,
  InvitationStatus,
  InvitationSummary,
} from '../../shared/schemas/invitations'
import type { CurrentUser, Role } from '../../shared/schemas/auth'
import { publicUrl } from '../config'
import { db } from '../db'
import { ConflictError, InvalidPayloadError, NotFoundError, UnauthenticatedError } from '../errors/app-error'
import { zodIssues } from '../errors/translate-error'
import { invitationMail } from '../mail/templates/invitation-mail'
import type { Conn } from '../repositories/connection'
import {
  findInvitationById,
  findInvitationByTokenHash,
  insertInvitation,
  listInvitationsOfLab,
  markInvitationAccepted,
  markInvitationRevoked,
  revokeOpenInvitations,
  type InvitationRecord,
} from '../repositories/invitations.repo'
import { findLabById } from '../repositories/labs.repo'
import { findMembership, upsertMembership } from '../repositories/memberships.repo'
import { findActiveUserWithHashByEmail, insertUser } from '../repositories/users.repo'
import { recordAudit } from './audit.service'
import { hashInvitationToken, newInvitationToken } from './invitation-tokens'
import { enqueueMail } from './mail-outbox.service'
import { hashPassword, verifyPassword } from './passwords'

const DAY_MS = 24 * 60 * 60 * 1000

function statusOf(invitation: InvitationRecord, now = new Date()): InvitationStatus {
  if (invitation.acceptedAt) return 'accepted'
  if (invitation.revokedAt) return 'revoked'
  return invitation.expiresAt <= now ? 'expired' : 'pending'
}

function toSummary(invitation: InvitationRecord): InvitationSummary {
  return {
    id: invitation.id,
    labId: invitation.labId,
    email: invitation.email,
    role: invitation.role,
    status: statusOf(invitation),
    createdAt: invitation.createdAt.toISOString(),
    expiresAt: invitation.expiresAt.toISOString(),
    invitedBy: invitation.invitedBy,
  }
}

/** The landing page link. The token sits after '#', which browsers never send to any server. */
export function invitationLink(token: string): string {
  return `${publicUrl.replace(/\/+$/, '')}/join#${token}`
}

/**
 * Creates an invitation inside `trx` and queues its e-mail there too. An earlier unanswered
 * invitation of the same address to the same lab is revoked: only the newest link works.
 */
export async function createInvitationIn(
  trx: Conn,
  inviter: CurrentUser,
  lab: { id: number; name: string },
  input: InvitationCreate,
): Promise<InvitationSummary> {
  const existing = await findActiveUserWithHashByEmail(input.email, trx)
  if (existing && (await findMembership(existing.id, lab.id, trx))) {
    throw new ConflictError(`${input.email} is already a member of ${lab.name}.`, {
      reason: 'already_member',
    })
  }
  const replaced = await revokeOpenInvitations(lab.id, input.email, inviter.id, trx)
  const token = newInvitationToken()
  const expiresAt = new Date(Date.now() + INVITATION_VALID_DAYS * DAY_MS)
  const id = await insertInvitation(
    {
      labId: lab.id,
      email: input.email,
      role: input.role,
      tokenHash: hashInvitationToken(token),
      invitedBy: inviter.id,
      expiresAt,
    },
    trx,
  )
  await enqueueMail(
    trx,
    invitationMail({
      to: input.email,
      labName: lab.name,
      role: input.role,
      inviterName: inviter.name,
      link: invitationLink(token),
      expiresAt,
    }),
  )
  await recordAudit(trx, {
    action: 'invitation.created',
    actorUserId: inviter.id,
    labId: lab.id,
    subjectType: 'invitation',
    subjectId: id,
    details: {
      email: input.email,
      role: input.role,
      ...(replaced.length ? { replacedInvitationIds: replaced } : {}),
    },
  })
  return toSummary((await findInvitationById(id, trx))!)
}

/** The route has checked that the inviter is a PI of the lab or an admin. */
export async function createInvitation(
  inviter: CurrentUser,
  labId: number,
  input: InvitationCreate,
): Promise<InvitationSummary> {
  return db.transaction(async (trx) => {
    const lab = await findLabById(labId, trx)
    if (!lab) throw new NotFoundError('Lab not found.')
    return createInvitationIn(trx, inviter, lab, input)
  })
}

export async function listInvitations(labId: number): Promise<InvitationSummary[]> {
  if (!(await findLabById(labId))) throw new NotFoundError('Lab not found.')
  return (await listInvitationsOfLab(labId)).map(toSummary)
}

export async function revokeInvitation(
  actor: CurrentUser,
  labId: number,
  invitationId: number,
): Promise<InvitationSummary> {
  return db.transaction(async (trx) => {
    const invitation = await findInvitationById(invitationId, trx)
    if (!invitation || invitation.labId !== labId) throw new NotFoundError('Invitation not found.')
    const status = statusOf(invitation)
    if (status === 'accepted')
      throw new ConflictError('This invitation has already been accepted.', { status })
    if (status === 'revoked') throw new ConflictError('This invitation was already revoked.', { status })
    if (!(await markInvitationRevoked(invitation.id, actor.id, trx))) {
      throw new ConflictError('This invitation was answered a moment ago.')
    }
    await recordAudit(trx, {
      action: 'invitation.revoked',
      actorUserId: actor.id,
      labId,
      subjectType: 'invitation',
      subjectId: invitation.id,
      details: { email: invitation.email, role: invitation.role },
    })
    return toSummary((await findInvitationById(invitation.id, trx))!)
  })
}

const unusable: Record<Exclude<InvitationStatus, 'pending'> | 'unknown', string> = {
  unknown: 'This invitation link is not valid. Check that you copied the whole link from the e-mail.',
  expired: 'This invitation has expired. Ask the lab’s PI to send a new one.',
  accepted: 'This invitation has already been used. Sign in with the account that accepted it.',
  revoked: 'This invitation was withdrawn. Ask the lab’s PI if you should have access.',
}

/** 404 with the reason (unknown, expired, accepted, revoked) unless the invitation can still be accepted. */
async function openInvitationFor(token: string, conn: Conn, lock: boolean): Promise<InvitationRecord> {
  const invitation = await findInvitationByTokenHash(hashInvitationToken(token), conn, { lock })
  const status = invitation ? statusOf(invitation) : 'unknown'
  if (!invitation || status !== 'pending') {
    throw new NotFoundError(unusable[status as keyof typeof unusable], { reason: status })
  }
  return invitation
}

export async function previewInvitation(token: string): Promise<InvitationPreview> {
  const invitation = await openInvitationFor(token, db, false)
  return {
    labName: invitation.labName,
    role: invitation.role,
    email: invitation.email,
    invitedByName: invitation.invitedBy?.name ?? null,
    expiresAt: invitation.expiresAt.toISOString(),
    accountExists: !!(await findActiveUserWithHashByEmail(invitation.email)),
  }
}

export interface AcceptOutcome {
  userId: number
  labId: number
  labName: string
  role: Role
  createdAccount: boolean
}

function fieldError(path: string, message: string): InvalidPayloadError {
  return new InvalidPayloadError('Some fields are not valid.', { issues: [{ path, message }] })
}

/**
 * Accepts an invitation once. A new person gets an account (name + password); someone with an
 * account proves it with their password, or is already signed in as the invited address.
 * The membership keeps an existing role if the person is in the lab already.
 */
export async function acceptInvitation(
  input: InvitationAccept,
  signedIn: CurrentUser | undefined,
): Promise<AcceptOutcome> {
  return db.transaction(async (trx) => {
    const invitation = await openInvitationFor(input.token, trx, true)
    const account = await findActiveUserWithHashByEmail(invitation.email, trx)
    let userId: number
    let createdAccount = false

    if (signedIn) {
      if (signedIn.email !== invitation.email) {
        throw new ConflictError(
          `This invitation is for ${invitation.email}, but you are signed in as ${signedIn.email}. Sign out first.`,
          { reason: 'signed_in_as_someone_else' },
        )
      }
      userId = signedIn.id
    } else if (account) {
      if (!input.password || !(await verifyPassword(input.password, account.passwordHash))) {
        throw new UnauthenticatedError('The password is not right for this account.')
      }
      userId = account.id
    } else {
      const name = PersonName.safeParse(input.name ?? '')
      if (!name.success) throw fieldError('name', zodIssues(name.error)[0].message)
      const password = NewPassword.safeParse(input.password ?? '')
      if (!password.success) throw fieldError('password', zodIssues(password.error)[0].message)
      const user = await insertUser(
        { email: invitation.email, name: name.data, passwordHash: await hashPassword(password.data) },
        trx,
      )
      userId = user.id
      createdAccount = true
    }

    const existing = await findMembership(userId, invitation.labId, trx)
    if (!existing) await upsertMembership({ userId, labId: invitation.labId, role: invitation.role }, trx)
    if (!(await markInvitationAccepted(invitation.id, userId, trx))) {
      throw new NotFoundError(unusable.accepted, { reason: 'accepted' })
    }
    await recordAudit(trx, {
      action: 'invitation.accepted',
      actorUserId: userId,
      labId: invitation.labId,
      subjectType: 'invitation',
      subjectId: invitation.id,
      details: {
        email: invitation.email,
        role: existing?.role ?? invitation.role,
        createdAccount,
        ...(existing ? { alreadyMember: true } : {}),
      },
    })
    return {
      userId,
      labId: invitation.labId,
      labName: invitation.labName,
      role: existing?.role ?? invitation.role,
      createdAccount,
    }
  })
}
