import type { RequestHandler } from 'express'
import { ForbiddenError } from '../errors/app-error'

const READ_ONLY_METHODS = new Set(['GET', 'HEAD', 'OPTIONS'])
export const REQUESTED_WITH_HEADER = 'x-requested-with'
export const REQUESTED_WITH_VALUE = 'nestwise'

function originOf(url: string | undefined): string | undefined {
  if (!url) return undefined
  try {
    return new URL(url).origin
  } catch {
    return undefined
  }
}

/**
 * Cross-site request defence for cookie-authenticated writes (see DEVELOPERS.md):
 * every non-GET request must come from one of our own origins (Origin header, or Referer when a
 * browser omits Origin) and carry `X-Requested-With: nestwise`. A cross-site form cannot set that
 * header, and a cross-site script cannot without a CORS pre-flight, which this API never grants.
 * `allowedOrigins` are added to the origin the request itself was addressed to (its Host, which
 * middleware/allowed-hosts has checked against our own names before this runs).
 */
export function requireSameOriginWrites(allowedOrigins: readonly string[]): RequestHandler {
  const allowed = new Set(allowedOrigins.map((o) => originOf(o)).filter((o): o is string => Boolean(o)))
  return (req, _res, next) => {
    if (READ_ONLY_METHODS.has(req.method)) return next()
    const own = originOf(`${req.protocol}://${req.get('host') ?? ''}`)
    const origin = req.get('origin')
    const claimed = origin !== undefined ? originOf(origin) : originOf(req.get('referer'))
    if (!claimed || (claimed !== own && !allowed.has(claimed))) {
      throw new ForbiddenError('This request did not come from the Nestwise app, so it was refused.', {
        reason: 'origin',
      })
    }
    if (req.get(REQUESTED_WITH_HEADER) !== REQUESTED_WITH_VALUE) {
      throw new ForbiddenError('This request did not come from the Nestwise app, so it was refused.', {
        reason: 'missing X-Requested-With header',
      })
    }
    next()
  }
}
