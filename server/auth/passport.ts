import type { Request, Response } from 'express'
import passport from 'passport'
import { Strategy as LocalStrategy } from 'passport-local'
import { loadCurrentUser, verifyCredentials } from '../services/auth.service'

type Authenticator = InstanceType<typeof passport.Authenticator>

/**
 * A passport instance of its own per app (not the global singleton), so several apps in one
 * process, as in the integration tests, do not share configuration.
 */
export function createPassport(): Authenticator {
  const instance = new passport.Authenticator()
  instance.use(
    new LocalStrategy({ usernameField: 'email', passwordField: 'password' }, (email, password, done) => {
      verifyCredentials(email, password).then(
        (user) => done(null, user ?? false),
        (err: unknown) => done(err),
      )
    }),
  )
  // The session holds only the user id; the user and their memberships are reloaded on every
  // request, so role changes and deleted accounts take effect at once.
  instance.serializeUser<number>((user, done) => done(null, user.id))
  instance.deserializeUser<number>((id, done) => {
    loadCurrentUser(id).then(
      (user) => done(null, user ?? false),
      (err: unknown) => done(err),
    )
  })
  return instance
}

/** Runs the local strategy; resolves with the user, or false for wrong credentials. */
export function authenticateWithPassword(
  instance: Authenticator,
  req: Request,
  res: Response,
): Promise<Express.User | false> {
  return new Promise((resolve, reject) => {
    const middleware = instance.authenticate(
      'local',
      { session: false },
      (err: unknown, user: Express.User | false) => {
        if (err) reject(err)
        else resolve(user)
      },
    )
    middleware(req, res, reject)
  })
}

/** passport 0.7's req.logIn regenerates the session id before storing the user (no fixation). */
export function logIn(req: Request, user: Express.User): Promise<void> {
  return new Promise((resolve, reject) => req.logIn(user, (err) => (err ? reject(err) : resolve())))
}

export function destroySession(req: Request): Promise<void> {
  return new Promise((resolve, reject) => {
    if (!req.session) return resolve()
    req.session.destroy((err) => (err ? reject(err) : resolve()))
  })
}
