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
import { ChunkChannel } from '../ingest/chunk-channel'
import { ingestConfig } from '../ingest/ingest-config'
import { liveDiskStorage } from '../ingest/live-upload-storage'
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

const MALFORMED_FORM =
  /^(Malformed part header|Multipart: Boundary not found|Malformed content type|Unsupported content type|Missing Content-Type)/

/** Text tables are ingested while they arrive; workbooks are read once on disk (their zip needs the whole file). */
const LIVE_EXTENSIONS = new Set(['.csv', '.tsv', '.tab', '.txt'])

/** Random names: the original name is kept in the database, never used as a path. */
const tempName = (file: Express.Multer.File) =>
  `${Date.now()}-${randomBytes(8).toString('hex')}${extname(file.originalname).toLowerCase().slice(0, 8)}`

/**
 * An upload being ingested while it arrives: the storing runs alongside the transfer and waits,
 * before it commits, for the request to complete (`accept`) — or gives up when it fails (`reject`).
 */
interface LiveIngest {
  channel: ChunkChannel
  accept: (size: number) => void
  reject: (error: Error) => void
  result: Promise<unknown>
}

/**
 * The route's use case for an upload that may run live: `begin` checks the text fields that came
 * before the file and returns the work to start, or null to wait for the whole file instead.
 */
type LiveStarter = (req: Request) => ((file: UploadedFile, progress: ProgressSink) => Promise<unknown>) | null

function uploadMiddleware(begin: LiveStarter): RequestHandler {
  mkdirSync(ingestConfig.uploadsDir, { recursive: true })
  const upload = multer({
    storage: liveDiskStorage(ingestConfig.uploadsDir, tempName, (req, file, path) => {
      if (!LIVE_EXTENSIONS.has(extname(file.originalname).toLowerCase())) return null
      const work = begin(req)
      if (!work) return null
      const res = req.res!
      const channel = new ChunkChannel()
      let accept!: (size: number) => void
      let reject!: (error: Error) => void
      const accepted = new Promise<number>((resolve, fail) => {
        accept = resolve
        reject = fail
      })
      accepted.catch(() => {})
      const size = Number(req.get('content-length')) || 0
      const result = runUpload(res, (progress) =>
        work({ path, originalName: file.originalname, size, live: { channel, accepted } }, progress),
      )
      // Awaited by the route handler; this only keeps an early failure from counting as unhandled.
      result.catch(() => {})
      res.locals.live = { channel, accept, reject, result } satisfies LiveIngest
      return channel
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
      const message = (err as { message?: string }).message
      if (message === 'Request aborted' || message === 'Request closed')
        return next(new InvalidPayloadError('The upload was cancelled before it was stored.'))
      // busboy's words for a body that stops before its closing boundary, or is no form at all.
      if (message === 'Unexpected end of form' || message === 'Unexpected end of file')
        return next(
          new InvalidPayloadError('The upload arrived incomplete (the form ended early). Try again.'),
        )
      if (message && MALFORMED_FORM.test(message))
        return next(
          new InvalidPayloadError('The upload is not a valid form: send it as multipart/form-data.'),
        )
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

/** A failed multipart transfer stops a live ingest (nothing is stored) and is reported to the progress entry. */
const failProgress: ErrorRequestHandler = (err, req, res, next) => {
  const live = res.locals.live as LiveIngest | undefined
  if (live) {
    const error = err instanceof Error ? err : new Error(String(err))
    live.channel.fail(error)
    live.reject(error)
  }
  finishProgress(req, res, err)
  next(err)
}

function uploadedFile(req: Request): UploadedFile {
  if (!req.file) throw new InvalidPayloadError('Choose a file to upload (form field “file”).')
  return { path: req.file.path, originalName: req.file.originalname, size: req.file.size }
}

/** Runs an upload's use case with progress reporting and cancellation when the uploader goes away. */
async function runUpload<T>(res: Response, work: (progress: ProgressSink) => Promise<T>): Promise<T> {
  const reported = (res.locals.progress as ProgressSink | undefined) ?? noProgress
  // A closed connection before the answer means the uploader cancelled: stop, roll back, store nothing.
  const cancel = new AbortController()
  const onClose = () => {
    if (!res.writableEnded)
      cancel.abort(new InvalidPayloadError('The upload was cancelled before it was stored.'))
  }
  res.on('close', onClose)
  try {
    return await work({ update: (change) => reported.update(change), signal: cancel.signal })
  } finally {
    res.off('close', onClose)
  }
}

/**
 * After multer: lets a live ingest commit and waits for it, or runs the use case on the complete
 * file. Reports the end to the progress entry and removes the temp file whatever happens.
 */
async function completeUpload<T>(
  req: Request,
  res: Response,
  work: (file: UploadedFile, progress: ProgressSink) => Promise<T>,
): Promise<T> {
  const live = res.locals.live as LiveIngest | undefined
  try {
    let result: T
    if (live) {
      live.accept(req.file?.size ?? 0)
      result = (await live.result) as T
    } else {
      const file = uploadedFile(req)
      result = await runUpload(res, (progress) => work(file, progress))
    }
    finishProgress(req, res, null)
    return result
  } catch (error) {
    finishProgress(req, res, error)
    throw error
  } finally {
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
  // Fields sent before the file (as the client does) let the ingest start while the file arrives.
  const createLive: LiveStarter = (req) => {
    const fields = DatasetUploadFields.safeParse(req.body ?? {})
    if (!fields.success) return null
    return (file, progress) => createDatasetFromUpload(req.user!, fields.data, file, progress)
  }
  const versionLive: LiveStarter = (req) => {
    const fields = VersionUploadFields.safeParse(req.body ?? {})
    if (!fields.success) return null
    return (file, progress) =>
      addVersionFromUpload(req.user!, Number(req.params.datasetId), fields.data.sheet, file, progress)
  }
  const uploadDatasetFile = uploadMiddleware(createLive)
  const uploadVersionFile = uploadMiddleware(versionLive)

  router.get('/uploads/:token', validate({ params: UploadTokenParams }), (req, res) => {
    const progress = uploadProgress.get(req.params.token as string, req.user!.id)
    if (!progress) throw new NotFoundError('No upload with this token.')
    res.json({ data: progress })
  })

  router.get('/', validate({ query: DatasetListQuery }), async (req, res) => {
    const query = req.query as unknown as { labId?: number; projectId?: number; deleted: boolean }
    res.json({ data: await listDatasetsFor(req.user!, query) })
  })

  router.post('/', startProgress, uploadDatasetFile, failProgress, async (req: Request, res: Response) => {
    const detail = await completeUpload(req, res, async (file, progress) => {
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
    uploadVersionFile,
    failProgress,
    async (req: Request, res: Response) => {
      const detail = await completeUpload(req, res, async (file, progress) => {
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
