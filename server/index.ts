import { createApp } from './app'
import { closeSharedSessionStore } from './auth/session'
import { config, publicUrl } from './config'
import { db } from './db'
import { startAnalysisRunner, stopAnalysisRunner } from './jobs/analysis-runner'
import { logger } from './logger'
import { startMailRuntime } from './mail/mail-runtime'

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

// Mail (the outbox sender, and the local fake SMTP server outside production) runs in this process.
const mail = startMailRuntime().catch((err: unknown) => {
  logger.error('mail could not start; messages stay in the outbox', { err })
  return undefined
})

// Queued analyses run in a worker thread of this process; other processes on the same database share the queue.
startAnalysisRunner()

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
  // A run in flight goes back to the queue for the next start (or another process).
  await stopAnalysisRunner()
  await Promise.allSettled([closeSharedSessionStore(), db.destroy()])
  logger.info('stopped')
  process.exit(0)
}

process.once('SIGTERM', () => void shutdown('SIGTERM'))
process.once('SIGINT', () => void shutdown('SIGINT'))
