import { existsSync } from 'node:fs'
import { fileURLToPath } from 'node:url'
import express, { type Express } from 'express'
import type { Store } from 'express-session'
import { config, ownHostNames, parseTrustProxy, publicUrl, type TrustProxy } from './config'
import { createPassport } from './auth/passport'
import { getSharedSessionStore, sessionMiddleware } from './auth/session'
import { allowedHosts } from './middleware/allowed-hosts'
import { auditContext } from './middleware/audit-context'
import { clientApp } from './middleware/client-app'
import { errorHandler, notFound } from './middleware/error-handler'
import { anonymousRateLimit, loginRateLimits } from './middleware/rate-limits'
import { requestId } from './middleware/request-id'
import { requestLog } from './middleware/request-log'
import { requireSameOriginWrites } from './middleware/same-origin'
import { securityHeaders } from './middleware/security-headers'
import { pingDatabase } from './repositories/health.repo'
import { waitingRuns } from './queue/analysis-queue'
import { adminRoutes } from './routes/admin.routes'
import { analysesRoutes } from './routes/analyses.routes'
import { authRoutes } from './routes/auth.routes'
import { datasetsRoutes } from './routes/datasets.routes'
import { healthRoutes } from './routes/health.routes'
import { invitationsRoutes } from './routes/invitations.routes'
import { labsRoutes } from './routes/labs.routes'
import { projectsRoutes } from './routes/projects.routes'
import { boardRoutes } from './routes/board.routes'
import { analysisReviewRoutes, reviewRequestsRoutes } from './routes/reviews.routes'
import { sharedRoutes } from './routes/shared.routes'
import { plansRoutes } from './routes/plans.routes'
import { agreementRoutes } from './routes/agreement.routes'

const defaultClientDir = fileURLToPath(new URL('../dist/client', import.meta.url))

export interface AppOptions {
  /** Where sessions are kept; defaults to the process-wide PostgreSQL store. */
  sessionStore?: Store
  /** Built client to serve; null serves none. Defaults to dist/client when it has an index.html. */
  clientDir?: string | null
  /** Failed sign-ins per address + email in 15 minutes; defaults to LOGIN_RATE_LIMIT. */
  loginRateLimit?: number
  /** Requests per minute and address on the share-link routes; defaults to SHARED_RATE_LIMIT. */
  sharedRateLimit?: number
  /** Origins allowed to send writes, besides the one each request is addressed to. Defaults to PUBLIC_URL. */
  allowedOrigins?: string[]
  /** Host names answered (besides IP addresses); defaults to PUBLIC_URL's, HOST, localhost and ALLOWED_HOSTS. */
  allowedHosts?: string[]
  /** Reverse proxies to believe (Express "trust proxy"); defaults to TRUST_PROXY. */
  trustProxy?: TrustProxy
  /** Database probe for the health routes. */
  pingDatabase?: () => Promise<void>
  /** Analysis-queue probe for the readiness route. */
  pingQueue?: () => Promise<unknown>
}

function defaultClient(): string | null {
  return existsSync(`${defaultClientDir}/index.html`) ? defaultClientDir : null
}

/** The whole Nestwise HTTP application, without listening (server/index.ts listens; tests use supertest). */
export function createApp(options: AppOptions = {}): Express {
  const app = express()
  const https = publicUrl.startsWith('https:')
  // Behind a reverse proxy, trusting it (and only it) gives rate limits and the audit log the
  // client's address and lets secure cookies work; see TRUST_PROXY in docs/deploy.md.
  app.set('trust proxy', options.trustProxy ?? parseTrustProxy(config.TRUST_PROXY, https))
  app.disable('x-powered-by')

  // With an https PUBLIC_URL the session cookie is Secure: it is only ever sent over TLS (behind a
  // proxy that ends TLS, TRUST_PROXY lets the server see that the request came in over https).
  const cookie = { secure: https }
  const passport = createPassport()

  app.use(requestId())
  app.use(requestLog())
  app.use(securityHeaders({ https }))
  app.use(allowedHosts(options.allowedHosts ?? ownHostNames))

  app.use('/api', express.json({ limit: '1mb' }))
  app.use('/api', requireSameOriginWrites(options.allowedOrigins ?? [publicUrl]))
  app.use(
    '/api/health',
    healthRoutes({
      database: options.pingDatabase ?? (() => pingDatabase()),
      queue: options.pingQueue ?? (() => waitingRuns()),
    }),
  )

  const [sessions, touch] = sessionMiddleware(options.sessionStore ?? getSharedSessionStore(), cookie)
  app.use('/api/v1', sessions)
  app.use('/api/v1', passport.initialize())
  app.use('/api/v1', passport.session())
  // After passport, which tells a signed-in session from an empty one.
  app.use('/api/v1', touch)
  // After the session store's callbacks, so handlers run inside the request's audit context.
  app.use('/api/v1', auditContext())
  app.use(
    '/api/v1/auth',
    authRoutes({
      passport,
      loginLimits: loginRateLimits(options.loginRateLimit ?? config.LOGIN_RATE_LIMIT),
      cookie,
    }),
  )
  app.use('/api/v1/labs', labsRoutes())
  app.use(
    '/api/v1/invitations',
    invitationsRoutes({ limits: loginRateLimits(options.loginRateLimit ?? config.LOGIN_RATE_LIMIT) }),
  )
  app.use('/api/v1/admin', adminRoutes())
  app.use('/api/v1/datasets', datasetsRoutes())
  app.use('/api/v1/projects', projectsRoutes())
  app.use('/api/v1/analyses', analysesRoutes())
  app.use('/api/v1/analyses', analysisReviewRoutes())
  app.use('/api/v1/review-requests', reviewRequestsRoutes())
  app.use('/api/v1/labs', boardRoutes())
  app.use(
    '/api/v1/shared',
    anonymousRateLimit(options.sharedRateLimit ?? config.SHARED_RATE_LIMIT),
    sharedRoutes(),
  )
  app.use('/api/v1/analyses', agreementRoutes())
  app.use('/api/v1/plans', plansRoutes())
  app.use('/api', notFound())

  const clientDir = options.clientDir === undefined ? defaultClient() : options.clientDir
  if (clientDir) app.use(clientApp(clientDir))

  app.use(notFound())
  app.use(errorHandler())
  return app
}
