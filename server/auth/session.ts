import connectPgSimple from 'connect-pg-simple'
import session, { type Store } from 'express-session'
import type { RequestHandler } from 'express'
import { config } from '../config'
import { logger } from '../logger'

export const SESSION_COOKIE = 'nestwise.sid'

const PgStore = connectPgSimple(session)

export interface SessionStoreOptions {
  /** Seconds between deletions of expired sessions; false turns pruning off (short-lived test apps). */
  pruneIntervalSeconds?: number | false
}

/**
 * Sessions live in PostgreSQL (table `session`, created by a migration), so they survive restarts.
 * The store has its own small pg pool; close() ends it.
 */
// @types/connect-pg-simple declares close() as void; version 10 returns a promise (it ends the pool).
export type SessionStore = Store & { close(): Promise<void> | void }

export function createSessionStore(options: SessionStoreOptions = {}): SessionStore {
  return new PgStore({
    conObject: {
      host: config.PGHOST,
      port: config.PGPORT,
      user: config.PGUSER,
      password: config.PGPASSWORD,
      database: config.PGDATABASE,
      max: 5,
    },
    tableName: 'session',
    createTableIfMissing: false,
    pruneSessionInterval: options.pruneIntervalSeconds ?? 15 * 60,
    errorLog: (...args: unknown[]) =>
      logger.error('session store', { err: args.find((a) => a instanceof Error) ?? args.join(' ') }),
  })
}

let sharedStore: SessionStore | undefined

/** The process-wide store used by createApp() unless a test passes its own. */
export function getSharedSessionStore(): SessionStore {
  sharedStore ??= createSessionStore()
  return sharedStore
}

export async function closeSharedSessionStore(): Promise<void> {
  const store = sharedStore
  sharedStore = undefined
  await store?.close()
}

export interface CookieSettings {
  secure: boolean
}

export function cookieOptions({ secure }: CookieSettings) {
  return { httpOnly: true, sameSite: 'lax' as const, secure, path: '/' }
}

export function sessionMiddleware(store: Store, cookie: CookieSettings): RequestHandler {
  return session({
    name: SESSION_COOKIE,
    secret: config.SESSION_SECRET,
    store,
    resave: false,
    // No cookie and no row until someone signs in.
    saveUninitialized: false,
    // Each answered request pushes expiry forward: SESSION_MAX_AGE_HOURS is an idle timeout.
    rolling: true,
    cookie: { ...cookieOptions(cookie), maxAge: config.SESSION_MAX_AGE_HOURS * 60 * 60 * 1000 },
  })
}
