import { isDeepStrictEqual } from 'node:util'
import { rm } from 'node:fs/promises'
import { extname } from 'node:path'
import type { ErrorRequestHandler, Request, RequestHandler, Response } from 'express'
import multer from 'multer'
import type { ZodType } from 'zod'
import { UPLOAD_TOKEN_HEADER, UploadTokenParams } from '../../shared/schemas/datasets'
import { InvalidPayloadError, PayloadTooLargeError } from '../errors/app-error'
import { translateError } from '../errors/translate-error'
import { ingestConfig } from '../ingest/ingest-config'
import type { UploadedFile } from '../ingest/ingest-file'
import { noProgress, type ProgressSink } from '../ingest/progress-sink'
import { logger } from '../logger'
import { ChunkChannel } from './chunk-channel'
import { liveDiskStorage } from './live-upload-storage'
import { tempUploads } from './temp-files'
import { uploadProgress } from './upload-progress'

/**
 * The multipart intake of an upload route: progress under the client's upload token, the file
 * written to this process's temp folder, the ingest started while the file arrives when the form's
 * fields came first, cancellation when the uploader goes away, and the temp file removed at the end.
 *
 * The fast path's contract: the fields the ingest starts with are those sent before the file. The
 * client sends them first; a field that arrives after the file (or changes one) would be ignored by
 * an ingest already running, so that ingest is abandoned (nothing is stored) and the upload is
 * stored again from the complete file with every field.
 */
export interface UploadUseCase<F, T> {
  /** The form's text fields; a request whose fields do not parse is answered 400. */
  fields: ZodType<F>
  /** Stores the upload; its result is answered 201 { data }. */
  store(req: Request, fields: F, file: UploadedFile, progress: ProgressSink): Promise<T>
}

/** Text tables are ingested while they arrive; workbooks are read once on disk (their zip needs the whole file). */
const LIVE_EXTENSIONS = new Set(['.csv', '.tsv', '.tab', '.txt'])

const MALFORMED_FORM =
  /^(Malformed part header|Multipart: Boundary not found|Malformed content type|Unsupported content type|Missing Content-Type)/

/** This process's folder for uploads in transfer. */
export const uploadTemp = tempUploads(ingestConfig.uploadsRoot)
const temp = uploadTemp

/**
 * An upload being ingested while it arrives: the storing runs alongside the transfer and waits,
 * before it commits, for the request to complete (`accept`), or gives up when it fails (`reject`).
 */
interface LiveIngest {
  channel: ChunkChannel
  accept: (size: number) => void
  reject: (error: Error) => void
  result: Promise<unknown>
  /** The form's fields when the ingest started, to check nothing came after the file. */
  fieldsAtStart: unknown
}

class FieldsAfterFile extends Error {}

/** A copy of the fields as they are now (multer adds to req.body as parts arrive). */
const snapshot = (body: unknown) => structuredClone((body ?? {}) as object)

function multipartError(err: unknown): unknown {
  const code = (err as { code?: string }).code
  if (code === 'LIMIT_FILE_SIZE')
    return new PayloadTooLargeError(
      `The file is larger than the upload limit of ${ingestConfig.uploadMaxMb} MB. Split it, or ask the administrator to raise UPLOAD_MAX_MB.`,
      { limitMb: ingestConfig.uploadMaxMb },
    )
  const message = (err as { message?: string }).message
  if (message === 'Request aborted' || message === 'Request closed')
    return new InvalidPayloadError('The upload was cancelled before it was stored.')
  // busboy's words for a body that stops before its closing boundary, or is no form at all.
  if (message === 'Unexpected end of form' || message === 'Unexpected end of file')
    return new InvalidPayloadError('The upload arrived incomplete (the form ended early). Try again.')
  if (message && MALFORMED_FORM.test(message))
    return new InvalidPayloadError('The upload is not a valid form: send it as multipart/form-data.')
  if (code === 'LIMIT_UNEXPECTED_FILE' || code === 'LIMIT_FILE_COUNT')
    return new InvalidPayloadError('Send one file, in the form field “file”.')
  return err
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

function multipartIntake<F, T>(useCase: UploadUseCase<F, T>): RequestHandler {
  const upload = multer({
    storage: liveDiskStorage(
      (file) => temp.pathFor(file.originalname),
      (req, file, path) => {
        if (!LIVE_EXTENSIONS.has(extname(file.originalname).toLowerCase())) return null
        // Fields that came before the file: start now; otherwise wait for the whole file.
        const fields = useCase.fields.safeParse(req.body ?? {})
        if (!fields.success) return null
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
          useCase.store(
            req,
            fields.data,
            { path, originalName: file.originalname, size, live: { channel, accepted } },
            progress,
          ),
        )
        // Awaited at completion; this only keeps an early failure from counting as unhandled.
        result.catch(() => {})
        res.locals.live = {
          channel,
          accept,
          reject,
          result,
          fieldsAtStart: snapshot(req.body),
        } satisfies LiveIngest
        return channel
      },
    ),
    limits: { fileSize: ingestConfig.uploadMaxBytes, files: 1, fields: 20, fieldSize: 16 * 1024, parts: 25 },
  }).single('file')
  return (req, res, next) => {
    upload(req, res, (err?: unknown) => (err ? next(multipartError(err)) : next()))
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

/**
 * After multer: lets a live ingest commit and waits for it, or stores the complete file. A live
 * ingest whose fields changed after the file began is abandoned first (see the contract above).
 */
async function completeUpload<F, T>(req: Request, res: Response, useCase: UploadUseCase<F, T>): Promise<T> {
  const live = res.locals.live as LiveIngest | undefined
  try {
    let result: T
    if (live && isDeepStrictEqual(snapshot(req.body), live.fieldsAtStart)) {
      live.accept(req.file?.size ?? 0)
      result = (await live.result) as T
    } else {
      if (live) {
        logger.info('upload fields arrived after the file: storing from the complete file instead')
        live.reject(new FieldsAfterFile('fields after the file'))
        await live.result.catch(() => {})
      }
      const file = uploadedFile(req)
      const fields = useCase.fields.parse(req.body ?? {})
      result = await runUpload(res, (progress) => useCase.store(req, fields, file, progress))
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

/** The handlers of an upload route, in order; the last answers 201 { data } with the use case's result. */
export function uploadRoute<F, T>(useCase: UploadUseCase<F, T>): (RequestHandler | ErrorRequestHandler)[] {
  const complete: RequestHandler = async (req, res) => {
    res.status(201).json({ data: await completeUpload(req, res, useCase) })
  }
  return [startProgress, multipartIntake(useCase), failProgress, complete]
}
