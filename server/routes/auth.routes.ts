import { Router, type RequestHandler } from 'express'
import { LoginRequest } from '../../shared/schemas/auth'
import { authenticateWithPassword, destroySession, logIn } from '../auth/passport'
import type { createPassport } from '../auth/passport'
import { SESSION_COOKIE, cookieOptions, type CookieSettings } from '../auth/session'
import { UnauthenticatedError } from '../errors/app-error'
import { requireUser } from '../middleware/auth'
import { validate } from '../middleware/validate'
import { recordFailedSignIn, recordSignIn, recordSignOut } from '../services/auth.service'

export interface AuthRoutesOptions {
  passport: ReturnType<typeof createPassport>
  loginLimits: RequestHandler[]
  cookie: CookieSettings
}

/** /api/v1/auth: sign in, sign out, and who am I. */
export function authRoutes({ passport, loginLimits, cookie }: AuthRoutesOptions): Router {
  const router = Router()

  router.post('/login', ...loginLimits, validate({ body: LoginRequest }), async (req, res) => {
    const user = await authenticateWithPassword(passport, req, res)
    // One message for unknown email and wrong password: it must not reveal which accounts exist.
    if (!user) {
      await recordFailedSignIn((req.body as LoginRequest).email)
      throw new UnauthenticatedError('The email or password is not right.')
    }
    await logIn(req, user)
    await recordSignIn(user.id)
    res.json({ data: user })
  })

  router.post('/logout', async (req, res) => {
    const userId = req.user?.id
    await destroySession(req)
    if (userId !== undefined) await recordSignOut(userId)
    res.clearCookie(SESSION_COOKIE, cookieOptions(cookie))
    res.status(204).end()
  })

  router.get('/me', requireUser, (req, res) => {
    res.setHeader('Cache-Control', 'no-store')
    res.json({ data: req.user })
  })

  // "Who is signed in, if anyone": what the app asks when it starts. Nobody is an answer (200 with
  // null), not an error, so the sign-in page and a read-only link log no failed request.
  router.get('/session', (req, res) => {
    res.setHeader('Cache-Control', 'no-store')
    res.json({ data: req.user ?? null })
  })

  return router
}
