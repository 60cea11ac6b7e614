import type { CurrentUser, Membership } from '../../shared/schemas/auth'
import {
  findActiveUserWithHashByEmail,
  findActiveUserWithMemberships,
  type User,
} from '../repositories/users.repo'
import { db } from '../db'
import { recordAudit } from './audit.service'
import { hashPassword, verifyPassword } from './passwords'

// Verifying against a throwaway hash when the email is unknown makes "no such user" take as long
// as "wrong password", so response times do not reveal which emails have accounts.
let decoyHash: Promise<string> | undefined
function getDecoyHash(): Promise<string> {
  decoyHash ??= hashPassword('decoy password that matches no account')
  return decoyHash
}

export function toCurrentUser(user: User, memberships: Membership[]): CurrentUser {
  return { id: user.id, email: user.email, name: user.name, isAdmin: user.isAdmin, memberships }
}

/** The signed-in view of a user (with lab memberships), or undefined when the account is gone. */
export async function loadCurrentUser(userId: number): Promise<CurrentUser | undefined> {
  const user = await findActiveUserWithMemberships(userId)
  return user && toCurrentUser(user, user.memberships)
}

/** The user whose email and password match, or null. Deleted accounts never match. */
export async function verifyCredentials(email: string, password: string): Promise<CurrentUser | null> {
  const user = await findActiveUserWithHashByEmail(email)
  if (!user) {
    await verifyPassword(password, await getDecoyHash())
    return null
  }
  if (!(await verifyPassword(password, user.passwordHash))) return null
  return (await loadCurrentUser(user.id)) ?? null
}

/** Audit entries of the session's life: signed in (with how), a failed try (its e-mail), signed out. */
export async function recordSignIn(userId: number, via?: 'invitation'): Promise<void> {
  await recordAudit(db, {
    action: 'auth.signed_in',
    actorUserId: userId,
    ...(via ? { details: { via } } : {}),
  })
}

export async function recordFailedSignIn(email: string): Promise<void> {
  await recordAudit(db, { action: 'auth.sign_in_failed', actorUserId: null, details: { email } })
}

export async function recordSignOut(userId: number): Promise<void> {
  await recordAudit(db, { action: 'auth.signed_out', actorUserId: userId })
}
