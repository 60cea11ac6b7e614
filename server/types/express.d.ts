import type { CurrentUser } from '../../shared/schemas/auth'

// Passport puts the deserialized user on req.user; ours is the CurrentUser the API returns.
declare global {
  namespace Express {
    // eslint-disable-next-line @typescript-eslint/no-empty-object-type
    interface User extends CurrentUser {}
    interface Request {
      /** Set by the request-id middleware; also sent back as X-Request-Id. */
      id: string
    }
  }
}

export {}
