import { Router, type RequestHandler } from 'express'
import { InvitationAccept, InvitationTokenBody } from '../../shared/schemas/invitations'
import { logIn } from '../auth/passport'
import { validate } from '../middleware/validate'
import { loadCurrentUser, recordSignIn } from '../services/auth.service'
import { acceptInvitation, previewInvitation } from '../services/invitations.service'

export interface InvitationsRoutesOptions {
  /** The sign-in rate limits: accepting may check a password, and failed tries count. */
  limits: RequestHandler[]
}

/**
 * /api/v1/invitations: the landing page of an invitation link, open to anyone holding the token.
 * Both calls are POSTs so the token travels in the body, never in a logged URL.
 */
export function invitationsRoutes({ limits }: InvitationsRoutesOptions): Router {
  const router = Router()

  router.post('/lookup', ...limits, validate({ body: InvitationTokenBody }), async (req, res) => {
    res.setHeader('Cache-Control', 'no-store')
    res.json({ data: await previewInvitation((req.body as InvitationTokenBody).token) })
  })

  router.post('/accept', ...limits, validate({ body: InvitationAccept }), async (req, res) => {
    const outcome = await acceptInvitation(req.body as InvitationAccept, req.user)
    const user = (await loadCurrentUser(outcome.userId))!
    if (!req.user) {
      await logIn(req, user)
      await recordSignIn(user.id, 'invitation')
    }
    res.json({ data: { user, labId: outcome.labId, labName: outcome.labName, role: outcome.role } })
  })

  return router
}
