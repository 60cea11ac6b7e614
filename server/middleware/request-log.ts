import type { RequestHandler } from 'express'
import { logger } from '../logger'

/** One line per request once it has been answered: method, path, status, duration, request id. */
export function requestLog(): RequestHandler {
  return (req, res, next) => {
    const started = process.hrtime.bigint()
    res.on('finish', () => {
      const ms = Number(process.hrtime.bigint() - started) / 1e6
      logger.info(`${req.method} ${req.originalUrl.split('?')[0]}`, {
        status: res.statusCode,
        ms: Math.round(ms * 10) / 10,
        requestId: req.id,
        user: req.user?.id,
      })
    })
    next()
  }
}
