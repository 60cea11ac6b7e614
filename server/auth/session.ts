import connectPgSimple from 'connect-pg-simple'
import session, { type Store } from 'express-session'
import type { RequestHandler } from 'express'
import pg from 'pg'
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

/**
 * The store's pool with each of its few statements (get, set, destroy, prune) prepared once per
 * connection: the session is read on every signed-in request.
 */
function preparingPool(pool: pg.Pool) {
  const names = new Map<string, string>()
  const nameOf = (text: string) => {
    let name = names.get(text)
    if (!name) names.set(text, (name = `session-store-${names.size + 1}`))
    return name
  }
  return {
    query: (text: string, values?: unknown[]) => pool.query({ name: nameOf(text), text, values }),
  }
}

export function createSessionStore(options: SessionStoreOptions = {}): SessionStore {
  const pool = new pg.Pool({
    host: config.PGHOST,
    port: config.PGPORT,
    user: config.PGUSER,
    password: config.PGPASSWORD,
    database: config.PGDATABASE,
    max: 10,
  })
  pool.on('error', (err) => logger.error('session store', { err }))
  const store = new PgStore({
    pool: preparingPool(pool) as unknown as pg.Pool,
    tableName: 'session',
    createTableIfMissing: false,
    // Expiry is written by saves, at most every TOUCH_EVERY_MS (see throttledTouch), not on every answer.
    disableTouch: true,
    pruneSessionInterval: options.pruneIntervalSeconds ?? 15 * 60,
    errorLog: (...args: unknown[]) =>
      logger.error('session store', { err: args.find((a) => a instanceof Error) ?? args.join(' ') }),
  })
  // The store closes only pools it made itself; this one is ours.
  const close = store.close.bind(store)
  return Object.assign(store, {
    close: async () => {
      await close()
      await pool.end()
    },
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

/**
 * How far a session's stored expiry may lag behind its last request. The idle timeout is then
 * between SESSION_MAX_AGE_HOURS minus this and SESSION_MAX_AGE_HOURS after the last request.
 */
export const TOUCH_EVERY_MS = 5 * 60 * 1000

declare module 'express-session' {
  interface SessionData {
    /** When the stored expiry was last pushed forward (ms since 1970). */
    touchedAt?: number
  }
}

/**
 * Writing the expiry back on every answered request cost a database write per request (and queued
 * behind the store's small pool). A signed-in session is saved, pushing its expiry forward, only
 * when its last save is more than TOUCH_EVERY_MS ago; sessions without a user are left alone.
 */
function throttledTouch(now: () => number): RequestHandler {
  return (req, _res, next) => {
    const session = req.session
    if (session && req.user && now() - (session.touchedAt ?? 0) > TOUCH_EVERY_MS) session.touchedAt = now()
    next()
  }
}

export function sessionMiddleware(
  store: Store,
  cookie: CookieSettings,
  now: () => number = Date.now,
): RequestHandler[] {
  return [
    session({
      name: SESSION_COOKIE,
      secret: config.SESSION_SECRET,
      store,
      resave: false,
      // No cookie and no row until someone signs in.
      saveUninitialized: false,
      // The cookie's expiry moves with each answer; the stored one with throttledTouch.
      rolling: true,
      cookie: { ...cookieOptions(cookie), maxAge: config.SESSION_MAX_AGE_HOURS * 60 * 60 * 1000 },
    }),
    throttledTouch(now),
  ]
}
