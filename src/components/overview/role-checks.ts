import type { CurrentUser, Role } from '../../../shared/schemas/auth'

/**
 * The labs where this person holds a role, for the overview's steps. One small function so the
 * rule can point at the shared access module once it exists; the server decides every request.
 */
export function labsWhereRole(user: CurrentUser, ...roles: Role[]): Set<number> {
  return new Set(user.memberships.filter((m) => roles.includes(m.role)).map((m) => m.labId))
}
