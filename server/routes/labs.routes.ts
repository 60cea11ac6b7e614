import { Router } from 'express'
import { AuditQuery } from '../../shared/schemas/audit'
import { InvitationCreate, InvitationParams } from '../../shared/schemas/invitations'
import { LabIdParams, MemberParams, MemberRoleUpdate } from '../../shared/schemas/labs'
import { requireLabRole, requireUser } from '../middleware/auth'
import { validate } from '../middleware/validate'
import { listLabAudit } from '../services/audit.service'
import { createInvitation, listInvitations, revokeInvitation } from '../services/invitations.service'
import { changeMemberRole, removeMember } from '../services/lab-members.service'
import { listLabMembers, listLabsVisibleTo } from '../services/labs.service'

/**
 * /api/v1/labs: the labs a user works in, and who else is in them. Every member reads the member
 * list; the lab's PIs (and instance admins) invite, change roles, remove members and read the
 * lab's audit log. Labs the caller is not in answer 404.
 */
export function labsRoutes(): Router {
  const router = Router()
  router.use(requireUser)
  const piOrAdmin = requireLabRole(['pi'], { allowAdmin: true })

  router.get('/', async (req, res) => {
    res.json({ data: await listLabsVisibleTo(req.user!) })
  })

  router.get(
    '/:labId/members',
    validate({ params: LabIdParams }),
    requireLabRole('any', { allowAdmin: true }),
    async (req, res) => {
      const { labId } = req.params as unknown as LabIdParams
      res.json({ data: await listLabMembers(labId) })
    },
  )

  router.patch(
    '/:labId/members/:userId',
    validate({ params: MemberParams, body: MemberRoleUpdate }),
    piOrAdmin,
    async (req, res) => {
      const { labId, userId } = req.params as unknown as MemberParams
      res.json({
        data: await changeMemberRole(req.user!, labId, userId, (req.body as MemberRoleUpdate).role),
      })
    },
  )

  router.delete(
    '/:labId/members/:userId',
    validate({ params: MemberParams }),
    piOrAdmin,
    async (req, res) => {
      const { labId, userId } = req.params as unknown as MemberParams
      await removeMember(req.user!, labId, userId)
      res.status(204).end()
    },
  )

  router.get('/:labId/invitations', validate({ params: LabIdParams }), piOrAdmin, async (req, res) => {
    const { labId } = req.params as unknown as LabIdParams
    res.json({ data: await listInvitations(labId) })
  })

  router.post(
    '/:labId/invitations',
    validate({ params: LabIdParams, body: InvitationCreate }),
    piOrAdmin,
    async (req, res) => {
      const { labId } = req.params as unknown as LabIdParams
      res.status(201).json({ data: await createInvitation(req.user!, labId, req.body as InvitationCreate) })
    },
  )

  router.delete(
    '/:labId/invitations/:invitationId',
    validate({ params: InvitationParams }),
    piOrAdmin,
    async (req, res) => {
      const { labId, invitationId } = req.params as unknown as InvitationParams
      res.json({ data: await revokeInvitation(req.user!, labId, invitationId) })
    },
  )

  router.get(
    '/:labId/audit',
    validate({ params: LabIdParams, query: AuditQuery }),
    piOrAdmin,
    async (req, res) => {
      const { labId } = req.params as unknown as LabIdParams
      res.setHeader('Cache-Control', 'no-store')
      res.json({ data: await listLabAudit(labId, req.query as unknown as AuditQuery) })
    },
  )

  return router
}
