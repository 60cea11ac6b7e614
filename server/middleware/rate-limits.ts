import type { Request, RequestHandler } from 'express'
import { ipKeyGenerator, rateLimit } from 'express-rate-limit'
import { RateLimitedError } from '../errors/app-error'

const WINDOW_MS = 15 * 60 * 1000
/** An account's failures from every address together: a few addresses' worth of tries. */
const PER_ACCOUNT_FACTOR = 3
/**
 * Failures from one address over every account. A lab behind one address (a campus NAT, a proxy)
 * shares it, so it is far above what one person mistypes: a spray of guesses is slowed without
 * locking colleagues out.
 */
const PER_ADDRESS_FACTOR = 20

function clientAddress(req: Request): string {
  return ipKeyGenerator(req.ip ?? req.socket.remoteAddress ?? 'unknown')
}

function emailOf(req: Request): string {
  const email: unknown = (req.body as { email?: unknown } | undefined)?.email
  return typeof email === 'string' ? email.trim().normalize('NFC').toLowerCase() : ''
}

function limiter(limit: number, key: (req: Request) => string, prefix: string): RequestHandler {
  return rateLimit({
    windowMs: WINDOW_MS,
    limit,
    // Requests without an account (an invitation lookup) are left to the address limits.
    skip: (req) => key(req) === '',
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
 * Sign-in limits within 15 minutes, each answering 429 RATE_LIMITED with Retry-After:
 * `limit` failures per address and account (one person mistyping, or one attacker on one
 * account), three times that per account from all addresses (guessing spread over addresses),
 * and twenty times that per address over all accounts (a spray from one address). The address is
 * the client's as Express sees it: behind a reverse proxy, set TRUST_PROXY, or every client shares
 * the proxy's address. Must run after express.json().
 */
export function loginRateLimits(limit: number): RequestHandler[] {
  // Narrowest first: a try refused by one limit never reaches (and never counts in) the wider ones,
  // so an attacker shut out of one account at one address cannot go on to lock it for others.
  return [
    limiter(limit, (req) => `${clientAddress(req)}|${emailOf(req)}`, 'login-address-account'),
    limiter(limit * PER_ACCOUNT_FACTOR, emailOf, 'login-account'),
    limiter(limit * PER_ADDRESS_FACTOR, clientAddress, 'login-address'),
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
