import { Router } from 'express'
import { checkReadiness, type ReadinessProbes } from '../health/readiness'
import { logger } from '../logger'

/**
 * Health checks, open without a session and answered for every host name (load balancers probe by
 * internal names):
 * - GET /api/health/live: 200 while the process runs;
 * - GET /api/health/ready: 200 when the database and the analysis queue answer, else 503;
 * - GET /api/health: the database alone (what start scripts and monitors have always polled).
 */
export function healthRoutes(probes: ReadinessProbes): Router {
  const router = Router()
  router.use((_req, res, next) => {
    res.setHeader('Cache-Control', 'no-store')
    next()
  })

  router.get('/live', (_req, res) => {
    res.json({ data: { status: 'ok' } })
  })

  router.get('/ready', async (req, res) => {
    const { ready, checks, errors } = await checkReadiness(probes)
    if (!ready)
      logger.warn('readiness check failed', { requestId: req.id, checks, err: Object.values(errors)[0] })
    res.status(ready ? 200 : 503).json({ data: { status: ready ? 'ok' : 'unavailable', ...checks } })
  })

  router.get('/', async (req, res) => {
    const { ready, errors } = await checkReadiness({ database: probes.database })
    if (!ready) {
      logger.warn('health check: database unreachable', { requestId: req.id, err: errors.database })
      res.status(503).json({ data: { status: 'unavailable', database: 'unreachable' } })
      return
    }
    res.json({ data: { status: 'ok', database: 'ok' } })
  })
  return router
}
