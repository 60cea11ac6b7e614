import { ZodError } from 'zod'
import {
  AppError,
  ConflictError,
  InternalError,
  InvalidPayloadError,
  PayloadTooLargeError,
  ServiceUnavailableError,
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

/** Seconds a client is asked to wait (Retry-After) while the database cannot be reached. */
export const DATABASE_RETRY_SECONDS = 5

// Node's words for a connection that could not be made or was cut.
const CONNECTION_CODES = new Set([
  'ECONNREFUSED',
  'ECONNRESET',
  'ETIMEDOUT',
  'EHOSTUNREACH',
  'ENETUNREACH',
  'EPIPE',
  'ENOTFOUND',
  'EAI_AGAIN',
])
// SQLSTATE: class 08 (connection exception), the server shutting down or starting (57P01–57P03),
// and too many connections (53300).
const UNAVAILABLE_SQLSTATE = /^(08...|57P0[123]|53300)$/
// node-postgres and knex say these without a code.
const CONNECTION_MESSAGES =
  /^(Connection terminated|Client has encountered a connection error|Client was closed and is not queryable|Knex: Timeout acquiring a connection)/

/**
 * True when the error means the database cannot be reached (down, restarting, or the network in
 * between), rather than that it refused what was asked.
 */
export function isDatabaseUnavailable(err: unknown): boolean {
  if (typeof err !== 'object' || err === null) return false
  const { code, message, name } = err as { code?: unknown; message?: unknown; name?: unknown }
  if (typeof code === 'string' && (CONNECTION_CODES.has(code) || UNAVAILABLE_SQLSTATE.test(code))) return true
  if (name === 'KnexTimeoutError') return true
  return typeof message === 'string' && CONNECTION_MESSAGES.test(message)
}

/** Map anything thrown inside a request to the error the API answers with. Unknown errors become INTERNAL. */
export function translateError(err: unknown): AppError {
  if (err instanceof AppError) return err
  if (isDatabaseUnavailable(err)) {
    return new ServiceUnavailableError(
      'Nestwise cannot reach its database just now. Try again in a few seconds.',
      DATABASE_RETRY_SECONDS,
    )
  }
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
