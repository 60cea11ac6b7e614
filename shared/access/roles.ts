import type { CurrentUser, Membership, Role } from '../schemas/auth'

/**
 * Who holds which role where. Roles are per lab: a person may be a PI in one lab and a
 * biostatistician in another. Instance administration is a separate flag and grants no lab role.
 */
export type AccessUser = Pick<CurrentUser, 'id' | 'isAdmin' | 'memberships'>

/** Scientists and PIs upload, tag, exclude, analyse, plan and ask for reviews. */
export const WRITER_ROLES: readonly Role[] = ['scientist', 'pi']
/** PIs lead a lab: members, invitations, the audit log, deleting anyone's dataset, sharing. */
export const LEAD_ROLE: Role = 'pi'
/** Biostatisticians review and sign off. */
export const REVIEWER_ROLE: Role = 'biostatistician'

export function membershipIn(user: AccessUser | null | undefined, labId: number): Membership | undefined {
  return user?.memberships.find((m) => m.labId === labId)
}

/** The labs whose records the person may see (their memberships; administration adds none). */
export function readableLabIds(user: AccessUser | null | undefined): number[] {
  return user?.memberships.map((m) => m.labId) ?? []
}

/** The labs where the person may upload, analyse and plan. */
export function writableLabs(user: AccessUser | null | undefined): Membership[] {
  return user?.memberships.filter((m) => WRITER_ROLES.includes(m.role)) ?? []
}

/** The labs the person leads as PI. */
export function ledLabs(user: AccessUser | null | undefined): Membership[] {
  return user?.memberships.filter((m) => m.role === LEAD_ROLE) ?? []
}

/** Roles the person holds in any lab (screens shown or not; each request is still checked per lab). */
export function rolesOf(user: AccessUser | null | undefined): Set<Role> {
  return new Set(user?.memberships.map((m) => m.role) ?? [])
}
