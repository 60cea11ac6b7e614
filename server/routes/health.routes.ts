import { Router } from 'express'
import { logger } from '../logger'

/** GET /api/health: 200 when the database answers, 503 when it does not (for start scripts and monitors). */
export function healthRoutes(pingDatabase: () => Promise<void>): Router {
  const router = Router()
  router.get('/', async (req, res) => {
    res.setHeader('Cache-Control', 'no-store')
    try {
      await pingDatabase()
      res.json({ data: { status: 'ok', database: 'ok' } })
    } catch (err) {
      logger.warn('health check: database unreachable', { requestId: req.id, err })
      res.status(503).json({ data: { status: 'unavailable', database: 'unreachable' } })
    }
  })
  return router
}
