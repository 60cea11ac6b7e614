import { Router } from 'express'
import {
  PlanCreate,
  PlanDefaultsQuery,
  PlanListQuery,
  PlanParams,
  PlanPreview,
  PlanUpdate,
} from '../../shared/schemas/plans'
import { requireUser } from '../middleware/auth'
import { validate } from '../middleware/validate'
import {
  createPlanFor,
  deletePlanFor,
  getPlanFor,
  listPlansFor,
  planDefaultsFor,
  previewPlan,
  updatePlanFor,
} from '../services/plans.service'

/** /api/v1/plans — see docs/api-plans.md for who may call what. */
export function plansRoutes(): Router {
  const router = Router()
  router.use(requireUser)

  router.get('/', validate({ query: PlanListQuery }), async (req, res) => {
    res.json({ data: await listPlansFor(req.user!, req.query as unknown as PlanListQuery) })
  })

  router.get('/defaults', validate({ query: PlanDefaultsQuery }), async (req, res) => {
    const query = req.query as unknown as { analysisId: number; versionNo: number }
    res.json({ data: await planDefaultsFor(req.user!, query.analysisId, query.versionNo) })
  })

  // Computes without saving: any signed-in user may try numbers (no lab data is read).
  router.post('/preview', validate({ body: PlanPreview }), (req, res) => {
    res.json({ data: previewPlan((req.body as PlanPreview).inputs) })
  })

  router.post('/', validate({ body: PlanCreate }), async (req, res) => {
    res.status(201).json({ data: await createPlanFor(req.user!, req.body as PlanCreate) })
  })

  router.get('/:planId', validate({ params: PlanParams }), async (req, res) => {
    res.json({ data: await getPlanFor(req.user!, Number(req.params.planId)) })
  })

  router.patch('/:planId', validate({ params: PlanParams, body: PlanUpdate }), async (req, res) => {
    res.json({ data: await updatePlanFor(req.user!, Number(req.params.planId), req.body as PlanUpdate) })
  })

  router.delete('/:planId', validate({ params: PlanParams }), async (req, res) => {
    await deletePlanFor(req.user!, Number(req.params.planId))
    res.status(204).end()
  })

  return router
}
