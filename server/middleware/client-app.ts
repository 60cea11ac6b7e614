import { join, sep } from 'node:path'
import express, { type Router } from 'express'

const LOOKS_LIKE_FILE = /\.[a-z0-9]+$/i

function isApiPath(path: string): boolean {
  return path === '/api' || path.startsWith('/api/')
}

/**
 * Serves the built Vue app from `dir`. Hashed files under assets/ are cached for a year; every
 * other non-API path that is not a file answers index.html so the client router can take over.
 */
export function clientApp(dir: string): Router {
  const router = express.Router()
  router.use(
    express.static(dir, {
      index: false,
      setHeaders(res, path) {
        if (path.includes(`${sep}assets${sep}`))
          res.setHeader('Cache-Control', 'public, max-age=31536000, immutable')
      },
    }),
  )
  router.get('/{*splat}', (req, res, next) => {
    if (isApiPath(req.path) || LOOKS_LIKE_FILE.test(req.path)) return next()
    res.setHeader('Cache-Control', 'no-cache')
    res.sendFile(join(dir, 'index.html'), (err) => err && next(err))
  })
  return router
}
