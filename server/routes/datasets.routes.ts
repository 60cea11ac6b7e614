import { Router, type Request } from 'express'
import {
  DatasetListQuery,
  DatasetParams,
  DatasetUpdate,
  DatasetUploadFields,
  ExclusionCreate,
  ExclusionParams,
  RowsQuery,
  TaggingInput,
  UploadTokenParams,
  VersionParams,
  VersionUploadFields,
} from '../../shared/schemas/datasets'
import { NotFoundError } from '../errors/app-error'
import { pipeline } from 'node:stream/promises'
import { originalStore } from '../originals'
import { logger } from '../logger'
import { requireUser } from '../middleware/auth'
import { validate } from '../middleware/validate'
import {
  addExclusion,
  listVersionExclusions,
  withdrawExclusion,
} from '../services/datasets-exclusions.service'
import { columnSummary, previewRows } from '../services/datasets-preview.service'
import { getDesign, getTagging, getTaggingHistory, saveTagging } from '../services/datasets-tagging.service'
import { addVersionFromUpload, createDatasetFromUpload } from '../services/datasets-upload.service'
import {
  deleteDatasetFor,
  getDatasetDetail,
  getVersionDetail,
  listDatasetsFor,
  originalOf,
  restoreDataset,
  updateDatasetFor,
} from '../services/datasets.service'
import { uploadRoute } from '../uploads/upload-intake'
import { uploadProgress } from '../uploads/upload-progress'

/**
 * /api/v1/datasets — upload, list, preview, tag, exclude. Documented in docs/api-datasets.md.
 * Uploads are parsed and stored within the request (201 when ready, 4xx naming row and column when
 * not); meanwhile GET /uploads/:token reports progress to the uploader.
 */
export function datasetsRoutes(): Router {
  const router = Router()
  router.use(requireUser)

  router.get('/uploads/:token', validate({ params: UploadTokenParams }), (req, res) => {
    const progress = uploadProgress.get(req.params.token as string, req.user!.id)
    if (!progress) throw new NotFoundError('No upload with this token.')
    res.json({ data: progress })
  })

  router.get('/', validate({ query: DatasetListQuery }), async (req, res) => {
    const query = req.query as unknown as { labId?: number; projectId?: number; deleted: boolean }
    res.json({ data: await listDatasetsFor(req.user!, query) })
  })

  router.post(
    '/',
    ...uploadRoute({
      fields: DatasetUploadFields,
      store: (req, fields, file, progress) => createDatasetFromUpload(req.user!, fields, file, progress),
    }),
  )

  router.get('/:datasetId', validate({ params: DatasetParams }), async (req, res) => {
    res.json({ data: await getDatasetDetail(req.user!, Number(req.params.datasetId)) })
  })

  router.patch('/:datasetId', validate({ params: DatasetParams, body: DatasetUpdate }), async (req, res) => {
    res.json({ data: await updateDatasetFor(req.user!, Number(req.params.datasetId), req.body) })
  })

  router.delete('/:datasetId', validate({ params: DatasetParams }), async (req, res) => {
    await deleteDatasetFor(req.user!, Number(req.params.datasetId))
    res.status(204).end()
  })

  router.post('/:datasetId/restore', validate({ params: DatasetParams }), async (req, res) => {
    res.json({ data: await restoreDataset(req.user!, Number(req.params.datasetId)) })
  })

  router.post(
    '/:datasetId/versions',
    validate({ params: DatasetParams }),
    ...uploadRoute({
      fields: VersionUploadFields,
      store: (req, fields, file, progress) =>
        addVersionFromUpload(req.user!, Number(req.params.datasetId), fields.sheet, file, progress),
    }),
  )

  const version = (req: Request) =>
    [req.user!, Number(req.params.datasetId), Number(req.params.versionNo)] as const

  router.get('/:datasetId/versions/:versionNo', validate({ params: VersionParams }), async (req, res) => {
    res.json({ data: await getVersionDetail(...version(req)) })
  })

  router.get(
    '/:datasetId/versions/:versionNo/columns',
    validate({ params: VersionParams }),
    async (req, res) => {
      res.json({ data: await columnSummary(...version(req)) })
    },
  )

  router.get(
    '/:datasetId/versions/:versionNo/rows',
    validate({ params: VersionParams, query: RowsQuery }),
    async (req, res) => {
      res.json({ data: await previewRows(...version(req), req.query as unknown as RowsQuery) })
    },
  )

  router.get(
    '/:datasetId/versions/:versionNo/suggestion',
    validate({ params: VersionParams }),
    async (req, res) => {
      res.json({ data: (await getVersionDetail(...version(req))).suggestion })
    },
  )

  router.get(
    '/:datasetId/versions/:versionNo/tagging',
    validate({ params: VersionParams }),
    async (req, res) => {
      res.json({ data: await getTagging(...version(req)) })
    },
  )

  router.put(
    '/:datasetId/versions/:versionNo/tagging',
    validate({ params: VersionParams, body: TaggingInput }),
    async (req, res) => {
      res.json({ data: await saveTagging(...version(req), req.body) })
    },
  )

  router.get(
    '/:datasetId/versions/:versionNo/tagging/history',
    validate({ params: VersionParams }),
    async (req, res) => {
      res.json({ data: await getTaggingHistory(...version(req)) })
    },
  )

  router.get(
    '/:datasetId/versions/:versionNo/design',
    validate({ params: VersionParams }),
    async (req, res) => {
      res.json({ data: await getDesign(...version(req)) })
    },
  )

  router.get(
    '/:datasetId/versions/:versionNo/exclusions',
    validate({ params: VersionParams }),
    async (req, res) => {
      res.json({ data: await listVersionExclusions(...version(req)) })
    },
  )

  router.post(
    '/:datasetId/versions/:versionNo/exclusions',
    validate({ params: VersionParams, body: ExclusionCreate }),
    async (req, res) => {
      res.status(201).json({ data: await addExclusion(...version(req), req.body) })
    },
  )

  router.delete(
    '/:datasetId/versions/:versionNo/exclusions/:exclusionId',
    validate({ params: ExclusionParams }),
    async (req, res) => {
      res.json({ data: await withdrawExclusion(...version(req), Number(req.params.exclusionId)) })
    },
  )

  router.get(
    '/:datasetId/versions/:versionNo/original',
    validate({ params: VersionParams }),
    async (req, res) => {
      const found = await originalOf(...version(req))
      const original = await originalStore().open(found.sha256)
      if (!original) throw new NotFoundError('The original file of this version is missing from the store.')
      res.attachment(found.originalFilename)
      res.setHeader('Content-Length', String(original.size))
      // Streamed from the store (disk or S3) to the client, never held in memory whole.
      await pipeline(original.stream, res).catch((err: unknown) => {
        if (!res.headersSent) throw err
        logger.warn('an original download was cut off', { requestId: req.id, err })
      })
    },
  )

  return router
}
