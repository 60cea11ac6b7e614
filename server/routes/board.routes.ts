import { Router } from 'express'
import { BoardQuery } from '../../shared/schemas/board'
import { LabIdParams } from '../../shared/schemas/labs'
import { requireLabRole, requireUser } from '../middleware/auth'
import { validate } from '../middleware/validate'
import { getLabBoard } from '../services/board.service'

/** /api/v1/labs/:labId/board — the lab's analyses for the lab meeting; every member of the lab reads it. */
export function boardRoutes(): Router {
  const router = Router()
  router.use(requireUser)
  router.get(
    '/:labId/board',
    validate({ params: LabIdParams, query: BoardQuery }),
    requireLabRole('any'),
    async (req, res) => {
      const { labId } = req.params as unknown as LabIdParams
      res.set('Cache-Control', 'no-store')
      res.json({ data: await getLabBoard(labId, req.query as unknown as BoardQuery) })
    },
  )
  return router
}
