import { createApp } from './app'
import { closeSharedSessionStore } from './auth/session'
import { config, publicUrl } from './config'
import { db } from './db'
import { analysisQueue, stopAnalysisQueue } from './queue/analysis-queue'
import { startAnalysisRunner, stopAnalysisRunner } from './jobs/analysis-runner'
import { logger } from './logger'
import { startMailRuntime } from './mail/mail-runtime'
import { startOriginalsRuntime } from './originals'
import { sweepDatasetLeftovers } from './services/datasets-upload.service'

// Give in-flight requests this long to finish on shutdown before connections are cut.
const SHUTDOWN_GRACE_MS = 10_000

const app = createApp()
const server = app.listen(config.PORT, config.HOST, (err?: Error) => {
  if (err) {
    logger.error('could not start the server', { host: config.HOST, port: config.PORT, err })
    process.exit(1)
  }
  logger.info(`Nestwise API listening on http://${config.HOST}:${config.PORT}`, {
    publicUrl,
    env: config.NODE_ENV,
  })
})
server.keepAliveTimeout = config.KEEP_ALIVE_SECONDS * 1000
// Node closes a kept-alive connection whose next request headers take longer than this.
server.headersTimeout = server.keepAliveTimeout + 1000

// Mail (the outbox sender, and the local fake SMTP server outside production) runs in this process.
const mail = startMailRuntime().catch((err: unknown) => {
  logger.error('mail could not start; messages stay in the outbox', { err })
  return undefined
})

// Originals: with ORIGINALS_STORE=s3 and no S3_ENDPOINT (development), the local fake S3 runs here.
const originals = startOriginalsRuntime().catch((err: unknown) => {
  logger.error('the local fake S3 could not start; uploads and downloads of originals will fail', { err })
  return undefined
})

// Once per web process (the one that takes uploads), after the originals' store is up: clear what
// a crash could have left (see sweepDatasetLeftovers).
void originals
  .then(() => sweepDatasetLeftovers())
  .then((swept) => {
    if (swept.versions || swept.tables || swept.tempFiles || swept.originals)
      logger.info('swept dataset leftovers', swept)
  })
  .catch((err: unknown) => logger.error('dataset leftover sweep failed', { err }))

// Queued analyses run in worker threads of this process (one by default, so `npm start` needs no
// second process); with ANALYSIS_WORKERS=0 only worker processes (server/worker.ts) run them.
const analysisWorkers = config.ANALYSIS_WORKERS ?? 1
if (analysisWorkers > 0) startAnalysisRunner({ concurrency: analysisWorkers })
analysisQueue().catch((err: unknown) =>
  logger.error('the analysis queue could not start yet; it is tried again on the next use', { err }),
)

let stopping = false
async function shutdown(signal: string): Promise<void> {
  if (stopping) return
  stopping = true
  logger.info('shutting down', { signal })
  const force = setTimeout(() => server.closeAllConnections(), SHUTDOWN_GRACE_MS).unref()
  await new Promise<void>((resolve) => {
    server.close(() => resolve())
    server.closeIdleConnections()
  })
  clearTimeout(force)
  await (await mail)?.stop()
  await (await originals)?.stop()
  // A run in flight goes back to the queue for the next start (or another process).
  await stopAnalysisRunner()
  await stopAnalysisQueue()
  await Promise.allSettled([closeSharedSessionStore(), db.destroy()])
  logger.info('stopped')
  process.exit(0)
}

process.once('SIGTERM', () => void shutdown('SIGTERM'))
process.once('SIGINT', () => void shutdown('SIGINT'))
