import type { ErrorRequestHandler, RequestHandler } from 'express'
import { NotFoundError, ServiceUnavailableError } from '../errors/app-error'
import { translateError } from '../errors/translate-error'
import { logger } from '../logger'

/** For paths no router answered: 404 NOT_FOUND in the API's error shape. */
export function notFound(): RequestHandler {
  return (req, _res, next) => {
    next(new NotFoundError(`Nothing here: ${req.method} ${req.originalUrl.split('?')[0]}`))
  }
}

/**
 * The last middleware: answers `{ error: { code, message, details? } }`. Server faults are logged
 * with the request id (which the response carries too); their internals never reach the client.
 */
export function errorHandler(): ErrorRequestHandler {
  return (err, req, res, next) => {
    const appError = translateError(err)
    if (appError instanceof ServiceUnavailableError) {
      // Expected while the database restarts; one line, not a stack per request.
      logger.warn('request answered 503', { requestId: req.id, path: req.originalUrl, reason: String(err) })
    } else if (appError.status >= 500) {
      logger.error('request failed', { requestId: req.id, method: req.method, path: req.originalUrl, err })
    }
    if (res.headersSent) {
      // Too late for a JSON answer; let Express close the connection.
      return next(err)
    }
    const details = appError.status >= 500 ? { requestId: req.id } : appError.details
    if (appError instanceof ServiceUnavailableError)
      res.setHeader('Retry-After', String(appError.retryAfterSeconds))
    res.status(appError.status).json({
      error: {
        code: appError.code,
        message: appError.message,
        ...(details === undefined ? {} : { details }),
      },
    })
  }
}
