import { mkdirSync } from 'node:fs'
import { rm } from 'node:fs/promises'
import { randomBytes } from 'node:crypto'
import { extname } from 'node:path'
import { Router, type ErrorRequestHandler, type Request, type RequestHandler, type Response } from 'express'
import multer from 'multer'
import {
  DatasetListQuery,
  DatasetParams,
  DatasetUpdate,
  DatasetUploadFields,
  ExclusionCreate,
  ExclusionParams,
  RowsQuery,
  TaggingInput,
  UPLOAD_TOKEN_HEADER,
  UploadTokenParams,
  VersionParams,
  VersionUploadFields,
} from '../../shared/schemas/datasets'
import { InvalidPayloadError, NotFoundError, PayloadTooLargeError } from '../errors/app-error'
import { translateError } from '../errors/translate-error'
import { ingestConfig } from '../ingest/ingest-config'
import type { UploadedFile } from '../ingest/ingest-file'
import { originalPath } from '../ingest/original-store'
import { noProgress, uploadProgress, type ProgressSink } from '../ingest/upload-progress'
import { logger } from '../logger'
import { requireUser } from '../middleware/auth'
import { validate } from '../middleware/validate'
import { versionFor } from '../services/datasets-access.service'
import {
  addExclusion,
  listVersionExclusions,
  withdrawExclusion,
} from '../services/datasets-exclusions.service'
import { columnSummary, previewRows } from '../services/datasets-preview.service'
import { getDesign, getTagging, getTaggingHistory, saveTagging } from '../services/datasets-tagging.service'
import {
  addVersionFromUpload,
  createDatasetFromUpload,
  sweepDatasetLeftovers,
} from '../services/datasets-upload.service'
import {
  deleteDatasetFor,
  getDatasetDetail,
  getVersionDetail,
  listDatasetsFor,
  restoreDataset,
  updateDatasetFor,
} from '../services/datasets.service'

let sweptOnce = false

/** Once per process: clear what a crash could have left (see sweepDatasetLeftovers). */
function sweepOnce(): void {
  if (sweptOnce) return
  sweptOnce = true
  setImmediate(() => {
    sweepDatasetLeftovers()
      .then((swept) => {
        if (swept.versions || swept.tables || swept.tempFiles || swept.originals)
          logger.info('swept dataset leftovers', swept)
      })
      .catch((err) => logger.error('dataset leftover sweep failed', { err }))
  })
}

function uploadMiddleware(): RequestHandler {
  mkdirSync(ingestConfig.uploadsDir, { recursive: true })
  const upload = multer({
    storage: multer.diskStorage({
      destination: ingestConfig.uploadsDir,
      // Random names: the original name is kept in the database, never used as a path.
      filename: (_req, file, done) =>
        done(
          null,
          `${Date.now()}-${randomBytes(8).toString('hex')}${extname(file.originalname).toLowerCase().slice(0, 8)}`,
        ),
    }),
    limits: { fileSize: ingestConfig.uploadMaxBytes, files: 1, fields: 20, fieldSize: 16 * 1024, parts: 25 },
  }).single('file')
  return (req, res, next) => {
    upload(req, res, (err?: unknown) => {
      if (!err) return next()
      const code = (err as { code?: string }).code
      if (code === 'LIMIT_FILE_SIZE') {
        return next(
          new PayloadTooLargeError(
            `The file is larger than the upload limit of ${ingestConfig.uploadMaxMb} MB. Split it, or ask the administrator to raise UPLOAD_MAX_MB.`,
            { limitMb: ingestConfig.uploadMaxMb },
          ),
        )
      }
      if (code === 'LIMIT_UNEXPECTED_FILE' || code === 'LIMIT_FILE_COUNT')
        return next(new InvalidPayloadError('Send one file, in the form field “file”.'))
      next(err)
    })
  }
}

/** Starts progress reporting when the client sent an upload token (X-Upload-Token). */
const startProgress: RequestHandler = (req, res, next) => {
  const token = req.get(UPLOAD_TOKEN_HEADER)
  if (token !== undefined) {
    if (!UploadTokenParams.shape.token.safeParse(token).success)
      throw new InvalidPayloadError('The upload token must be 8–64 letters, digits, - or _.')
    res.locals.uploadToken = token
    res.locals.progress = uploadProgress.start(token, req.user!.id, Number(req.get('content-length')) || 0)
  }
  next()
}

function finishProgress(req: Request, res: Response, error: unknown | null): void {
  const token = res.locals.uploadToken as string | undefined
  if (!token) return
  uploadProgress.finish(
    token,
    req.user!.id,
    error ? 'failed' : 'done',
    error ? translateError(error).message : null,
  )
}

/** Reports failures of the multipart parsing to the progress entry too, then passes them on. */
const failProgress: ErrorRequestHandler = (err, req, res, next) => {
  finishProgress(req, res, err)
  next(err)
}

function uploadedFile(req: Request): UploadedFile {
  if (!req.file) throw new InvalidPayloadError('Choose a file to upload (form field “file”).')
  return { path: req.file.path, originalName: req.file.originalname, size: req.file.size }
}

/** Runs an upload handler with progress reporting and removes the temp file whatever happens. */
async function withUpload<T>(
  req: Request,
  res: Response,
  work: (file: UploadedFile, progress: ProgressSink) => Promise<T>,
): Promise<T> {
  const reported = (res.locals.progress as ProgressSink | undefined) ?? noProgress
  // A closed connection before the answer means the uploader cancelled: stop, roll back, store nothing.
  const cancel = new AbortController()
  const onClose = () => {
    if (!res.writableEnded)
      cancel.abort(new InvalidPayloadError('The upload was cancelled before it was stored.'))
  }
  res.on('close', onClose)
  const progress: ProgressSink = { update: (change) => reported.update(change), signal: cancel.signal }
  try {
    const result = await work(uploadedFile(req), progress)
    finishProgress(req, res, null)
    return result
  } catch (error) {
    finishProgress(req, res, error)
    throw error
  } finally {
    res.off('close', onClose)
    if (req.file) await rm(req.file.path, { force: true })
  }
}

/**
 * /api/v1/datasets — upload, list, preview, tag, exclude. Documented in docs/api-datasets.md.
 * Uploads are parsed and stored within the request (201 when ready, 4xx naming row and column when
 * not); meanwhile GET /uploads/:token reports progress to the uploader.
 */
export function datasetsRoutes(): Router {
  sweepOnce()
  const router = Router()
  router.use(requireUser)
  const upload = uploadMiddleware()

  router.get('/uploads/:token', validate({ params: UploadTokenParams }), (req, res) => {
    const progress = uploadProgress.get(req.params.token as string, req.user!.id)
    if (!progress) throw new NotFoundError('No upload with this token.')
    res.json({ data: progress })
  })

  router.get('/', validate({ query: DatasetListQuery }), async (req, res) => {
    const query = req.query as unknown as { labId?: number; projectId?: number; deleted: boolean }
    res.json({ data: await listDatasetsFor(req.user!, query) })
  })

  router.post('/', startProgress, upload, failProgress, async (req: Request, res: Response) => {
    const detail = await withUpload(req, res, async (file, progress) => {
      const fields = DatasetUploadFields.parse(req.body ?? {})
      return createDatasetFromUpload(req.user!, fields, file, progress)
    })
    res.status(201).json({ data: detail })
  })

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
    startProgress,
    upload,
    failProgress,
    async (req: Request, res: Response) => {
      const detail = await withUpload(req, res, async (file, progress) => {
        const fields = VersionUploadFields.parse(req.body ?? {})
        return addVersionFromUpload(req.user!, Number(req.params.datasetId), fields.sheet, file, progress)
      })
      res.status(201).json({ data: detail })
    },
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
      const { version: found } = await versionFor(...version(req), 'read')
      await new Promise<void>((resolve, reject) => {
        res.download(originalPath(found.sha256), found.originalFilename, { dotfiles: 'allow' }, (err) => {
          if (!err) return resolve()
          if (res.headersSent) return resolve()
          reject(
            (err as NodeJS.ErrnoException).code === 'ENOENT'
              ? new NotFoundError('The original file of this version is missing from the store.')
              : err,
          )
        })
      })
    },
  )

  return router
}
