import { Router } from 'express'
import { requireAdmin } from '../middleware/auth'
import { listUsersWithMemberships } from '../services/users.service'

/** /api/v1/admin: instance administration (people, labs, roles). */
export function adminRoutes(): Router {
  const router = Router()
  router.use(requireAdmin)

  router.get('/users', async (_req, res) => {
    res.json({ data: await listUsersWithMemberships() })
  })

  return router
}
