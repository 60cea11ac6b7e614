import request from 'supertest'
import type { Express } from 'express'
import { appWriteHeaders } from './api'

/** Requests as one signed-in person (or anonymous without a cookie), writes with the app's headers. */
export function asUser(app: Express, cookie?: string) {
  const withCookie = (req: request.Test) => (cookie ? req.set('Cookie', cookie) : req)
  return {
    get: (path: string) => withCookie(request(app).get(path)),
    post: (path: string, body?: object) =>
      withCookie(request(app).post(path).set(appWriteHeaders)).send(body),
    put: (path: string, body?: object) => withCookie(request(app).put(path).set(appWriteHeaders)).send(body),
    patch: (path: string, body?: object) =>
      withCookie(request(app).patch(path).set(appWriteHeaders)).send(body),
    delete: (path: string) => withCookie(request(app).delete(path).set(appWriteHeaders)),
  }
}
