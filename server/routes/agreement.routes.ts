import { Router } from 'express'
import { AnalysisVersionParams } from '../../shared/schemas/analyses'
import { requireUser } from '../middleware/auth'
import { validate } from '../middleware/validate'
import { agreementFor } from '../services/agreement.service'

/** GET /api/v1/analyses/:analysisId/versions/:versionNo/agreement — see docs/api-plans.md. */
export function agreementRoutes(): Router {
  const router = Router()
  router.get(
    '/:analysisId/versions/:versionNo/agreement',
    requireUser,
    validate({ params: AnalysisVersionParams }),
    async (req, res) => {
      const { analysisId, versionNo } = req.params as unknown as { analysisId: number; versionNo: number }
      res.json({ data: await agreementFor(req.user!, Number(analysisId), Number(versionNo)) })
    },
  )
  return router
}
