import { Router, type Response } from 'express'
import { SharedTokenParams } from '../../shared/schemas/share-links'
import { NotFoundError } from '../errors/app-error'
import { sharedRExport } from '../services/r-export.service'
import { openSharedAnalysis, sharedUnitsCsv } from '../services/share-links.service'
import { sendRRows, sendRScript } from './r-export-responses'

/** A malformed token gets the same plain 404 as an unknown one: nothing to tell apart. */
function tokenOf(params: unknown): string {
  const parsed = SharedTokenParams.safeParse(params)
  if (!parsed.success)
    throw new NotFoundError('This link does not work (it may have expired or been withdrawn).')
  return parsed.data.token
}

function privateAnswer(res: Response): void {
  // The token sits in the path: keep it out of caches, search engines and Referer headers.
  res.set('Cache-Control', 'no-store')
  res.set('X-Robots-Tag', 'noindex, nofollow')
  res.set('Referrer-Policy', 'no-referrer')
}

/**
 * /api/v1/shared/:token — what someone holding a share link may read, without an account: one
 * version's result and chart, and its unit table when the creator allowed it. Read-only: there is
 * no other method here, and the same-origin guard refuses writes before any router.
 */
export function sharedRoutes(): Router {
  const router = Router()

  router.get('/:token', async (req, res) => {
    privateAnswer(res)
    res.json({ data: await openSharedAnalysis(tokenOf(req.params)) })
  })

  router.get('/:token/units.csv', async (req, res) => {
    privateAnswer(res)
    const file = await sharedUnitsCsv(tokenOf(req.params))
    res.set('Content-Type', 'text/csv; charset=utf-8')
    res.attachment(file.filename)
    res.send(`\uFEFF${file.body}`)
  })

  // "Check it in R": the script and the exact rows, under the same condition as the unit table.
  router.get('/:token/r/script.R', async (req, res) => {
    privateAnswer(res)
    sendRScript(res, (await sharedRExport(tokenOf(req.params))).script)
  })

  router.get('/:token/r/rows.csv', async (req, res) => {
    privateAnswer(res)
    await sendRRows(res, (await sharedRExport(tokenOf(req.params))).rows)
  })

  return router
}
