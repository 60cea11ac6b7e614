import { Router } from 'express'
import { AnalysisParams, AnalysisVersionParams } from '../../shared/schemas/analyses'
import {
  ReviewCommentCreate,
  ReviewDecision,
  ReviewListQuery,
  ReviewRequestCreate,
  ReviewRequestParams,
} from '../../shared/schemas/reviews'
import { ShareLinkCreate, ShareLinkParams } from '../../shared/schemas/share-links'
import { requireUser } from '../middleware/auth'
import { validate } from '../middleware/validate'
import {
  addComment,
  decideReview,
  getReviewState,
  getSignOffState,
  listMyReviews,
  requestReview,
  withdrawReview,
} from '../services/reviews.service'
import { createShareLink, listShareLinks, revokeShareLink } from '../services/share-links.service'

const version = (params: unknown) => {
  const { analysisId, versionNo } = params as { analysisId: number; versionNo: number }
  return [analysisId, versionNo] as const
}

/**
 * Review, sign-off and share links of analyses, mounted at /api/v1/analyses beside the analyses
 * router. See docs/api-reviews.md for who may call what.
 */
export function analysisReviewRoutes(): Router {
  const router = Router()
  router.use(requireUser)

  router.get(
    '/:analysisId/versions/:versionNo/review',
    validate({ params: AnalysisVersionParams }),
    async (req, res) => {
      res.set('Cache-Control', 'no-store')
      res.json({ data: await getReviewState(req.user!, ...version(req.params)) })
    },
  )

  router.get(
    '/:analysisId/versions/:versionNo/sign-off',
    validate({ params: AnalysisVersionParams }),
    async (req, res) => {
      res.set('Cache-Control', 'no-store')
      res.json({ data: await getSignOffState(req.user!, ...version(req.params)) })
    },
  )

  router.post(
    '/:analysisId/versions/:versionNo/review-requests',
    validate({ params: AnalysisVersionParams, body: ReviewRequestCreate }),
    async (req, res) => {
      res.status(201).json({ data: await requestReview(req.user!, ...version(req.params), req.body) })
    },
  )

  router.post(
    '/:analysisId/versions/:versionNo/comments',
    validate({ params: AnalysisVersionParams, body: ReviewCommentCreate }),
    async (req, res) => {
      res.status(201).json({ data: await addComment(req.user!, ...version(req.params), req.body) })
    },
  )

  router.get('/:analysisId/share-links', validate({ params: AnalysisParams }), async (req, res) => {
    res.set('Cache-Control', 'no-store')
    res.json({ data: await listShareLinks(req.user!, Number(req.params.analysisId)) })
  })

  router.post(
    '/:analysisId/share-links',
    validate({ params: AnalysisParams, body: ShareLinkCreate }),
    async (req, res) => {
      res.set('Cache-Control', 'no-store')
      res
        .status(201)
        .json({ data: await createShareLink(req.user!, Number(req.params.analysisId), req.body) })
    },
  )

  router.delete(
    '/:analysisId/share-links/:linkId',
    validate({ params: ShareLinkParams }),
    async (req, res) => {
      const { analysisId, linkId } = req.params as unknown as ShareLinkParams
      res.json({ data: await revokeShareLink(req.user!, analysisId, linkId) })
    },
  )

  return router
}

/** /api/v1/review-requests: the caller's review inbox and the decisions on a request. */
export function reviewRequestsRoutes(): Router {
  const router = Router()
  router.use(requireUser)

  router.get('/', validate({ query: ReviewListQuery }), async (req, res) => {
    res.set('Cache-Control', 'no-store')
    const query = req.query as unknown as ReviewListQuery
    res.json({ data: await listMyReviews(req.user!, query.scope === 'open') })
  })

  router.post(
    '/:requestId/decision',
    validate({ params: ReviewRequestParams, body: ReviewDecision }),
    async (req, res) => {
      const { requestId } = req.params as unknown as ReviewRequestParams
      res.json({ data: await decideReview(req.user!, requestId, req.body) })
    },
  )

  router.post('/:requestId/withdraw', validate({ params: ReviewRequestParams }), async (req, res) => {
    const { requestId } = req.params as unknown as ReviewRequestParams
    res.json({ data: await withdrawReview(req.user!, requestId) })
  })

  return router
}
