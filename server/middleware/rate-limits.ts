import type { Request, RequestHandler } from 'express'
import { ipKeyGenerator, rateLimit } from 'express-rate-limit'
import { RateLimitedError } from '../errors/app-error'

const WINDOW_MS = 15 * 60 * 1000
// Guessing passwords for many accounts from one address is slowed by a wider per-address limit.
const PER_ADDRESS_FACTOR = 5

function clientAddress(req: Request): string {
  return ipKeyGenerator(req.ip ?? req.socket.remoteAddress ?? 'unknown')
}

function emailOf(req: Request): string {
  const email: unknown = (req.body as { email?: unknown } | undefined)?.email
  return typeof email === 'string' ? email.trim().toLowerCase() : ''
}

function limiter(limit: number, key: (req: Request) => string, prefix: string): RequestHandler {
  return rateLimit({
    windowMs: WINDOW_MS,
    limit,
    // Only failed sign-ins count: a successful one is taken back off the tally.
    skipSuccessfulRequests: true,
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    keyGenerator: (req) => `${prefix}:${key(req)}`,
    handler: (_req, _res, next) => {
      next(new RateLimitedError('Too many sign-in attempts. Wait 15 minutes and try again.'))
    },
  })
}

/**
 * Sign-in limits: `limit` failures per address + email within 15 minutes, and five times that per
 * address over all emails. Answers 429 RATE_LIMITED with Retry-After. Must run after express.json().
 */
export function loginRateLimits(limit: number): RequestHandler[] {
  return [
    limiter(limit * PER_ADDRESS_FACTOR, clientAddress, 'login-address'),
    limiter(limit, (req) => `${clientAddress(req)}|${emailOf(req)}`, 'login-account'),
  ]
}

/**
 * Requests per address and minute on the routes anyone may call without an account (the share
 * links). A link holder reads a page a few times; a flood gets 429 RATE_LIMITED with Retry-After.
 */
export function anonymousRateLimit(perMinute: number): RequestHandler {
  return rateLimit({
    windowMs: 60 * 1000,
    limit: perMinute,
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    keyGenerator: (req) => `anonymous:${clientAddress(req)}`,
    handler: (_req, _res, next) => {
      next(new RateLimitedError('Too many requests from this address. Wait a minute and try again.'))
    },
  })
}
