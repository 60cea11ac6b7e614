import { AsyncLocalStorage } from 'node:async_hooks'
import type { Request, RequestHandler } from 'express'

/**
 * Keeps the current request reachable from services for the length of its handling, so an audit
 * entry can carry the request id, the client address and the signed-in user without every service
 * function taking the request as a parameter.
 */
const storage = new AsyncLocalStorage<Request>()

/**
 * Opens the context for the rest of the chain. Async handlers keep it across every await; a
 * middleware that continues from a plain callback (a session store, multer) loses it, so mount this
 * after such middleware (again), as createApp does after the session.
 */
export function auditContext(): RequestHandler {
  return (req, _res, next) => storage.run(req, next)
}

export interface RequestFacts {
  requestId: string | null
  ip: string | null
  userId: number | null
}

/** Facts about the request being handled, or nulls outside a request (scripts, the mail loop). */
export function currentRequestFacts(): RequestFacts {
  const req = storage.getStore()
  if (!req) return { requestId: null, ip: null, userId: null }
  return { requestId: req.id ?? null, ip: req.ip ?? null, userId: req.user?.id ?? null }
}
