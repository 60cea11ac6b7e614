import { Router } from 'express'
import {
  AnalysisCreate,
  AnalysisDefaultsQuery,
  AnalysisListQuery,
  AnalysisParams,
  AnalysisUpdate,
  AnalysisVersionCreate,
  AnalysisVersionParams,
} from '../../shared/schemas/analyses'
import { requireUser } from '../middleware/auth'
import { validate } from '../middleware/validate'
import {
  createAnalysisFor,
  createAnalysisVersionFor,
  exportUnitsCsv,
  getAnalysisDefaults,
  getAnalysisDetail,
  getAnalysisVersion,
  getAnalysisVersionStatus,
  listAnalysesFor,
  renameAnalysisFor,
} from '../services/analyses.service'
import { rExportFor } from '../services/r-export.service'
import { sendRRows, sendRScript } from './r-export-responses'

/** The parsed (numeric) ids of a version route. */
const version = (params: unknown) => {
  const { analysisId, versionNo } = params as { analysisId: number; versionNo: number }
  return [analysisId, versionNo] as const
}

/** /api/v1/analyses — see docs/api-analyses.md for who may call what. */
export function analysesRoutes(): Router {
  const router = Router()
  router.use(requireUser)

  router.get('/', validate({ query: AnalysisListQuery }), async (req, res) => {
    res.json({ data: await listAnalysesFor(req.user!, req.query as unknown as AnalysisListQuery) })
  })

  router.get('/defaults', validate({ query: AnalysisDefaultsQuery }), async (req, res) => {
    const query = req.query as unknown as { datasetId: number; datasetVersionNo?: number }
    res.json({ data: await getAnalysisDefaults(req.user!, query.datasetId, query.datasetVersionNo) })
  })

  router.post('/', validate({ body: AnalysisCreate }), async (req, res) => {
    res.status(201).json({ data: await createAnalysisFor(req.user!, req.body) })
  })

  router.get('/:analysisId', validate({ params: AnalysisParams }), async (req, res) => {
    res.json({ data: await getAnalysisDetail(req.user!, Number(req.params.analysisId)) })
  })

  router.patch(
    '/:analysisId',
    validate({ params: AnalysisParams, body: AnalysisUpdate }),
    async (req, res) => {
      res.json({
        data: await renameAnalysisFor(
          req.user!,
          Number(req.params.analysisId),
          (req.body as AnalysisUpdate).name,
        ),
      })
    },
  )

  router.post(
    '/:analysisId/versions',
    validate({ params: AnalysisParams, body: AnalysisVersionCreate }),
    async (req, res) => {
      res
        .status(201)
        .json({ data: await createAnalysisVersionFor(req.user!, Number(req.params.analysisId), req.body) })
    },
  )

  router.get(
    '/:analysisId/versions/:versionNo',
    validate({ params: AnalysisVersionParams }),
    async (req, res) => {
      res.json({ data: await getAnalysisVersion(req.user!, ...version(req.params)) })
    },
  )

  router.get(
    '/:analysisId/versions/:versionNo/status',
    validate({ params: AnalysisVersionParams }),
    async (req, res) => {
      // Polled while a version runs: never from a cache.
      res.set('Cache-Control', 'no-store')
      res.json({ data: await getAnalysisVersionStatus(req.user!, ...version(req.params)) })
    },
  )

  router.get(
    '/:analysisId/versions/:versionNo/units.csv',
    validate({ params: AnalysisVersionParams }),
    async (req, res) => {
      const file = await exportUnitsCsv(req.user!, ...version(req.params))
      res.set('Content-Type', 'text/csv; charset=utf-8')
      res.attachment(file.filename)
      // A byte-order mark so spreadsheet programs read the UTF-8 labels correctly.
      res.send(`\uFEFF${file.body}`)
    },
  )

  router.get(
    '/:analysisId/versions/:versionNo/r/script.R',
    validate({ params: AnalysisVersionParams }),
    async (req, res) => {
      sendRScript(res, (await rExportFor(req.user!, ...version(req.params))).script)
    },
  )

  router.get(
    '/:analysisId/versions/:versionNo/r/rows.csv',
    validate({ params: AnalysisVersionParams }),
    async (req, res) => {
      await sendRRows(res, (await rExportFor(req.user!, ...version(req.params))).rows)
    },
  )

  return router
}
