import type { CurrentUser, Membership } from '../../../shared/schemas/auth'

/**
 * Roles that upload, tag and exclude in a lab. Mirrors the server's rule so the screens offer only
 * what it would accept; the server still decides on every request.
 */
export const WRITER_ROLES: readonly Membership['role'][] = ['scientist', 'pi']

/** The labs where this person may upload tables. */
export function writableLabs(user: CurrentUser | null): Membership[] {
  return user?.memberships.filter((m) => WRITER_ROLES.includes(m.role)) ?? []
}
