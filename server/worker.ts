import { config } from './config'
import { db } from './db'
import { startHealthServer, type RunningHealthServer } from './health/health-server'
import { analysisQueue, stopAnalysisQueue, waitingRuns } from './queue/analysis-queue'
import { startAnalysisRunner, stopAnalysisRunner } from './jobs/analysis-runner'
import { logger } from './logger'
import { pingDatabase } from './repositories/health.repo'

// A worker process (`npm run worker`): runs queued analyses and nothing else: no HTTP app, no
// mail. As many at once as ANALYSIS_WORKERS says (default 1), each in a thread of its own; add
// processes (on this machine or others, against the same database) to run more.
const concurrency = config.ANALYSIS_WORKERS ?? 1
if (concurrency < 1) {
  logger.error('a worker process needs ANALYSIS_WORKERS of at least 1')
  process.exit(1)
}

startAnalysisRunner({ concurrency })
analysisQueue().then(
  () => logger.info(`analysis worker running, ${concurrency} at once`, { pid: process.pid }),
  (err: unknown) => logger.error('the analysis queue could not start yet; retrying while polling', { err }),
)

let health: RunningHealthServer | undefined
if (config.WORKER_HEALTH_PORT !== undefined) {
  health = await startHealthServer({
    host: config.WORKER_HEALTH_HOST,
    port: config.WORKER_HEALTH_PORT,
    probes: { database: () => pingDatabase(), queue: () => waitingRuns() },
  })
  logger.info(`worker health checks on http://${config.WORKER_HEALTH_HOST}:${health.port}/health/ready`)
}

let stopping = false
async function shutdown(signal: string): Promise<void> {
  if (stopping) return
  stopping = true
  logger.info('shutting down', { signal })
  // Runs in flight go back to the queue for another worker (or this one after a restart).
  await stopAnalysisRunner()
  await stopAnalysisQueue()
  await health?.close()
  await db.destroy()
  logger.info('stopped')
  process.exit(0)
}

process.once('SIGTERM', () => void shutdown('SIGTERM'))
process.once('SIGINT', () => void shutdown('SIGINT'))
