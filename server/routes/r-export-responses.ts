import type { Response } from 'express'
import { Readable } from 'node:stream'
import { pipeline } from 'node:stream/promises'
import type { RExport } from '../services/r-export.service'

/** The R script as a download. */
export function sendRScript(res: Response, file: RExport['script']): void {
  // attachment() first: it sets a type from the extension (.R is unknown), which ours replaces.
  res.attachment(file.filename)
  res.set('Content-Type', 'text/plain; charset=utf-8')
  res.send(file.body)
}

/**
 * The rows as a streamed CSV download: read back first (so a problem still answers with an error
 * status), then written chunk by chunk with back-pressure, never held whole in memory.
 */
export async function sendRRows(res: Response, rows: RExport['rows']): Promise<void> {
  const chunks = await rows.chunks()
  res.attachment(rows.filename)
  res.set('Content-Type', 'text/csv; charset=utf-8')
  await pipeline(Readable.from(chunks), res)
}
