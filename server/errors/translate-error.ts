import { ZodError } from 'zod'
import {
  AppError,
  ConflictError,
  InternalError,
  InvalidPayloadError,
  PayloadTooLargeError,
} from './app-error'

export interface FieldIssue {
  /** Dotted path into the payload, '' for the payload itself. */
  path: string
  message: string
}

export function zodIssues(error: ZodError): FieldIssue[] {
  return error.issues.map((issue) => ({
    path: issue.path.map(String).join('.'),
    message: issue.message,
  }))
}

// SQLSTATE codes we can explain to the caller; everything else is a server fault.
// https://www.postgresql.org/docs/current/errcodes-appendix.html
const PG_UNIQUE_VIOLATION = '23505'
const PG_FOREIGN_KEY_VIOLATION = '23503'
const PG_CHECK_VIOLATION = '23514'
const PG_NOT_NULL_VIOLATION = '23502'
const PG_INVALID_TEXT_REPRESENTATION = '22P02'
const PG_STRING_TOO_LONG = '22001'
const PG_NUMERIC_OUT_OF_RANGE = '22003'

interface PgLikeError {
  code: string
  constraint?: string
  column?: string
  severity?: string
}

function isPgError(err: unknown): err is PgLikeError {
  // node-postgres errors carry `severity` and a five-character SQLSTATE `code`.
  return (
    typeof err === 'object' &&
    err !== null &&
    typeof (err as PgLikeError).code === 'string' &&
    /^[0-9A-Z]{5}$/.test((err as PgLikeError).code) &&
    typeof (err as PgLikeError).severity === 'string'
  )
}

interface HttpLikeError {
  status?: number
  statusCode?: number
  type?: string
  expose?: boolean
}

function translatePgError(err: PgLikeError): AppError | undefined {
  switch (err.code) {
    case PG_UNIQUE_VIOLATION:
      return new ConflictError('This already exists.', { constraint: err.constraint })
    case PG_FOREIGN_KEY_VIOLATION:
      return new ConflictError('This refers to something that does not exist or is still in use.', {
        constraint: err.constraint,
      })
    case PG_CHECK_VIOLATION:
      return new InvalidPayloadError('A value is outside the allowed set.', { constraint: err.constraint })
    case PG_NOT_NULL_VIOLATION:
      return new InvalidPayloadError('A required value is missing.', { column: err.column })
    case PG_INVALID_TEXT_REPRESENTATION:
    case PG_STRING_TOO_LONG:
    case PG_NUMERIC_OUT_OF_RANGE:
      return new InvalidPayloadError('A value has the wrong format or size.')
    default:
      return undefined
  }
}

// Errors raised by body-parser (inside express.json) and multer before our code runs.
function translateHttpError(err: HttpLikeError & { code?: string; name?: string }): AppError | undefined {
  if (err.name === 'MulterError') {
    return err.code === 'LIMIT_FILE_SIZE'
      ? new PayloadTooLargeError()
      : new InvalidPayloadError('The upload is not valid.')
  }
  if (err.type === 'entity.too.large') return new PayloadTooLargeError()
  if (err.type === 'entity.parse.failed')
    return new InvalidPayloadError('The request body is not valid JSON.')
  const status = err.status ?? err.statusCode
  if (status === 413) return new PayloadTooLargeError()
  if (typeof status === 'number' && status >= 400 && status < 500 && err.expose) {
    return new InvalidPayloadError('The request is not valid.')
  }
  return undefined
}

/** Map anything thrown inside a request to the error the API answers with. Unknown errors become INTERNAL. */
export function translateError(err: unknown): AppError {
  if (err instanceof AppError) return err
  if (err instanceof ZodError) {
    return new InvalidPayloadError('Some fields are not valid.', { issues: zodIssues(err) })
  }
  if (isPgError(err)) {
    const translated = translatePgError(err)
    if (translated) return translated
  }
  if (typeof err === 'object' && err !== null) {
    const translated = translateHttpError(err as HttpLikeError)
    if (translated) return translated
  }
  return new InternalError()
}
