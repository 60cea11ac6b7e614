import { LEAD_ROLE, membershipIn, REVIEWER_ROLE, WRITER_ROLES, type AccessUser } from './roles'

/**
 * The permission rules, written once for the server (which enforces them) and the app (which offers
 * only what the server would accept). Each takes the person and the facts of the record it is about;
 * outside the person's labs every rule says no, and the server answers such ids with 404.
 */

/** Reading anything of a lab: every member. */
export function canRead(user: AccessUser, labId: number): boolean {
  return membershipIn(user, labId) !== undefined
}

/** Uploading, tagging, excluding, analysing, planning, creating projects: scientists and PIs. */
export function canWrite(user: AccessUser, labId: number): boolean {
  const membership = membershipIn(user, labId)
  return membership !== undefined && WRITER_ROLES.includes(membership.role)
}

/** Members, invitations and the audit log of a lab: its PIs, and instance administrators. */
export function canManageLab(user: AccessUser, labId: number): boolean {
  return user.isAdmin || membershipIn(user, labId)?.role === LEAD_ROLE
}

/** Deleting a dataset: the person who uploaded it, or a PI of its lab. */
export function canDeleteDataset(user: AccessUser, dataset: { labId: number; createdById: number }): boolean {
  const membership = membershipIn(user, dataset.labId)
  return membership !== undefined && (membership.role === LEAD_ROLE || dataset.createdById === user.id)
}

/** Restoring deleted datasets (and listing them): instance administrators. */
export function canRestoreDatasets(user: AccessUser): boolean {
  return user.isAdmin
}

/**
 * Sharing an analysis version through a read-only link, and withdrawing links: a PI of the lab or
 * an author (who created the analysis or the version; for a withdrawal also the link's creator).
 */
export function canShare(
  user: AccessUser,
  analysis: { labId: number; authorIds: readonly number[] },
): boolean {
  const membership = membershipIn(user, analysis.labId)
  return membership !== undefined && (membership.role === LEAD_ROLE || analysis.authorIds.includes(user.id))
}

/** Asking a biostatistician for a review: scientists and PIs. */
export function canRequestReview(user: AccessUser, labId: number): boolean {
  return canWrite(user, labId)
}

/** Commenting on a version: every member. */
export function canComment(user: AccessUser, labId: number): boolean {
  return canRead(user, labId)
}

/**
 * Signing off (or asking for changes): a biostatistician of the lab who did not write the analysis.
 * Which request they may decide is the request's own business (it names its reviewer).
 */
export function canSignOff(
  user: AccessUser,
  version: { labId: number; authorIds: readonly number[] },
): boolean {
  return membershipIn(user, version.labId)?.role === REVIEWER_ROLE && !version.authorIds.includes(user.id)
}

/** Withdrawing a review request: who asked, or a PI of the lab. */
export function canWithdrawReview(
  user: AccessUser,
  request: { labId: number; requestedById: number },
): boolean {
  const membership = membershipIn(user, request.labId)
  return membership !== undefined && (membership.role === LEAD_ROLE || request.requestedById === user.id)
}
