import type { RequestHandler } from 'express'
import { membershipIn } from '../../shared/access'
import type { Role } from '../../shared/schemas/auth'
import { ForbiddenError, NotFoundError, UnauthenticatedError } from '../errors/app-error'

/** Anonymous requests get 401 UNAUTHENTICATED. */
export const requireUser: RequestHandler = (req, _res, next) => {
  if (!req.user) throw new UnauthenticatedError()
  next()
}

/** Instance administrators only: 401 when anonymous, 403 for everyone else. */
export const requireAdmin: RequestHandler = (req, _res, next) => {
  if (!req.user) throw new UnauthenticatedError()
  if (!req.user.isAdmin) throw new ForbiddenError('Only instance administrators can do this.')
  next()
}

export interface LabRoleOptions {
  /** Let instance administrators through even without a membership (people and role management). */
  allowAdmin?: boolean
  /** Route parameter holding the lab id. */
  param?: string
}

/**
 * Members of the lab in `req.params.labId` with one of `roles` ('any' = every member).
 * A lab the user does not belong to answers 404, so nobody learns which other labs exist;
 * a member with the wrong role gets 403.
 */
export function requireLabRole(roles: readonly Role[] | 'any', options: LabRoleOptions = {}): RequestHandler {
  const param = options.param ?? 'labId'
  return (req, _res, next) => {
    const user = req.user
    if (!user) throw new UnauthenticatedError()
    const labId = Number(req.params[param])
    if (options.allowAdmin && user.isAdmin) return next()
    const membership = Number.isInteger(labId) ? membershipIn(user, labId) : undefined
    if (!membership) throw new NotFoundError('Lab not found.')
    if (roles !== 'any' && !roles.includes(membership.role)) {
      throw new ForbiddenError(`This needs the role ${roles.join(' or ')} in ${membership.labName}.`, {
        requiredRoles: roles,
        yourRole: membership.role,
      })
    }
    next()
  }
}
