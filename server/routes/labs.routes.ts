import { Router } from 'express'
import { LabIdParams } from '../../shared/schemas/labs'
import { requireLabRole, requireUser } from '../middleware/auth'
import { validate } from '../middleware/validate'
import { listLabMembers, listLabsVisibleTo } from '../services/labs.service'

/** /api/v1/labs: the labs a user works in, and who else is in them. */
export function labsRoutes(): Router {
  const router = Router()
  router.use(requireUser)

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

  return router
}
