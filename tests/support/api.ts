import request, { type Response } from 'supertest'
import type { Express } from 'express'
import { createApp, type AppOptions } from '../../server/app'
import { closeSharedSessionStore } from '../../server/auth/session'
import { publicUrl } from '../../server/config'
import { db } from '../../server/db'
import { stopAnalysisQueue } from '../../server/queue/analysis-queue'

/** Headers the Nestwise client sends on every write (see the same-origin check). */
export const appWriteHeaders = { Origin: publicUrl, 'X-Requested-With': 'nestwise' } as const

/** An app as the tests need it: no built client unless asked for. */
export function createTestApp(options: AppOptions = {}): Express {
  return createApp({ clientDir: null, ...options })
}

/** The `name=value` part of the session cookie a response set, if any. */
export function sessionCookieFrom(res: Response): string | undefined {
  const raw = res.headers['set-cookie'] as unknown
  const cookies: string[] = Array.isArray(raw) ? raw : typeof raw === 'string' ? [raw] : []
  return cookies.find((c) => c.startsWith('nestwise.sid='))?.split(';')[0]
}

export function postLogin(app: Express, email: string, password: string, cookie?: string) {
  const req = request(app).post('/api/v1/auth/login').set(appWriteHeaders)
  if (cookie) req.set('Cookie', cookie)
  return req.send({ email, password })
}

/** Signs in and returns the session cookie; fails the test when sign-in does not succeed. */
export async function signIn(app: Express, email: string, password: string): Promise<string> {
  const res = await postLogin(app, email, password)
  const cookie = sessionCookieFrom(res)
  if (res.status !== 200 || !cookie)
    throw new Error(`sign-in as ${email} failed: ${res.status} ${JSON.stringify(res.body)}`)
  return cookie
}

/** Call from afterAll in every integration file: ends the pools so the worker can exit. */
export async function closeConnections(): Promise<void> {
  await stopAnalysisQueue()
  await closeSharedSessionStore()
  await db.destroy()
}
