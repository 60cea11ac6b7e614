import { randomUUID } from 'node:crypto'
import type { RequestHandler } from 'express'

// A proxy's id is kept so log lines can be followed across hops; anything odd is replaced.
const ACCEPTABLE_ID = /^[A-Za-z0-9._:-]{8,128}$/

export function requestId(): RequestHandler {
  return (req, res, next) => {
    const incoming = req.get('x-request-id')
    req.id = incoming && ACCEPTABLE_ID.test(incoming) ? incoming : randomUUID()
    res.setHeader('X-Request-Id', req.id)
    next()
  }
}
