import type { RouteMeta } from 'vue-router'
import { rolesOf } from '../../shared/access'
import type { CurrentUser, Role } from '../../shared/schemas/auth'

export function hasAnyRole(user: CurrentUser | null, roles: readonly Role[]): boolean {
  const held = rolesOf(user)
  return roles.some((role) => held.has(role))
}

export type AccessDecision = 'allow' | 'sign-in' | 'not-available'

/**
 * Decides what the route guard does. `admin` and `roles` are both requirements when both are
 * given. This only keeps people away from screens that would fail; the API is the authority.
 */
export function decideAccess(meta: RouteMeta, user: CurrentUser | null): AccessDecision {
  if (meta.public) return 'allow'
  if (!user) return 'sign-in'
  if (meta.admin && !user.isAdmin) return 'not-available'
  if (meta.roles && !hasAnyRole(user, meta.roles)) return 'not-available'
  return 'allow'
}

/**
 * Only same-site paths may be used as the after-sign-in target, so a crafted link cannot
 * send someone to another site ("//evil.example" and "/\\evil.example" are protocol-relative).
 */
export function safeRedirect(target: unknown, fallback = '/'): string {
  if (typeof target !== 'string') return fallback
  if (!target.startsWith('/') || target.startsWith('//') || target.startsWith('/\\')) return fallback
  if (target.startsWith('/sign-in')) return fallback
  return target
}
