import PgBoss from 'pg-boss'
import { config } from '../config'
import { db } from '../db'
import { logger } from '../logger'
import { withClient, type Conn } from '../repositories/connection'

/**
 * The analysis queue on pg-boss: the only module that talks to it. pg-boss keeps its jobs in the
 * schema `pgboss`, which it creates and upgrades itself when the first process starts it (knex
 * migrations never touch that schema). It runs every statement through the app's own connections:
 * the pool for its own work, and the caller's transaction when a job is sent, completed or failed
 * together with the version row (`conn`), so a version and its job never disagree.
 *
 * One job per version (policy "stately", keyed by the version id: at most one waiting and one
 * running); three tries (pg-boss retries a job whose run was handed back as failed, see
 * analysis-runs.service); pg-boss's own expiry, a little after the run limit, is only a backstop.
 */
export const ANALYSIS_QUEUE = 'analysis-run'
/** Starts of one version before it is failed: a run that keeps killing its process must end. */
export const MAX_TRIES = 3
const SCHEMA = 'pgboss'

export interface QueuedRun {
  jobId: string
  versionId: number
  /** 1 on the first start, 2 after a run was taken back once, … */
  tryNo: number
}

export type JobState = 'created' | 'retry' | 'active' | 'completed' | 'cancelled' | 'failed'

function executorFor(conn: Conn): PgBoss.Db {
  return {
    executeSql: (text, values) =>
      withClient(conn, async (client) => ({ rows: (await client.query(text, values)).rows })),
  }
}

let started: Promise<PgBoss> | null = null

function createBoss(): PgBoss {
  const boss = new PgBoss({
    db: executorFor(db),
    schema: SCHEMA,
    migrate: true,
    // Expiry of stuck jobs and clean-up of finished ones; one process at a time does it.
    supervise: true,
    maintenanceIntervalSeconds: 60,
    // No cron jobs here.
    schedule: false,
  })
  boss.on('error', (err) => logger.error('analysis queue error', { err }))
  return boss
}

/** The started queue (created, or upgraded, on first use in this process). */
export function analysisQueue(): Promise<PgBoss> {
  started ??= (async () => {
    const boss = createBoss()
    await boss.start()
    const options = {
      name: ANALYSIS_QUEUE,
      policy: 'stately' as const,
      retryLimit: MAX_TRIES - 1,
      retryDelay: 0,
      // A live run is stopped at ANALYSIS_MAX_RUN_MINUTES by its runner; this only catches a runner
      // that could not do so.
      expireInSeconds: Math.round(config.ANALYSIS_MAX_RUN_MINUTES * 60) + 300,
      // How long a job may wait for a worker before pg-boss drops it: longer than any outage.
      retentionMinutes: 365 * 24 * 60,
    }
    await boss.createQueue(ANALYSIS_QUEUE, options)
    await boss.updateQueue(ANALYSIS_QUEUE, options)
    return boss
  })().catch((err: unknown) => {
    started = null
    throw err
  })
  return started
}

export async function stopAnalysisQueue(): Promise<void> {
  const current = started
  started = null
  const boss = await current?.catch(() => null)
  await boss?.stop({ graceful: false, close: false, wait: true })
}

/** Sends the job of a version, inside `conn`'s transaction; null when the version already has one waiting. */
export async function sendRun(versionId: number, conn: Conn): Promise<string | null> {
  const boss = await analysisQueue()
  return boss.send(ANALYSIS_QUEUE, { versionId }, { singletonKey: String(versionId), db: executorFor(conn) })
}

/** Takes the next waiting job, if any, for this process to run (inside `conn`'s transaction when given). */
export async function fetchRun(conn?: Conn): Promise<QueuedRun | null> {
  const boss = await analysisQueue()
  const [job] = await boss.fetch<{ versionId: number }>(ANALYSIS_QUEUE, {
    includeMetadata: true,
    batchSize: 1,
    ...(conn ? { db: executorFor(conn) } : {}),
  })
  return job ? { jobId: job.id, versionId: job.data.versionId, tryNo: job.retryCount + 1 } : null
}

/** The run ended (stored outcome, or handed back as a new job): the job is done, whatever the analysis says. */
export async function completeRun(jobId: string, conn: Conn): Promise<void> {
  const boss = await analysisQueue()
  await boss.complete(ANALYSIS_QUEUE, jobId, {}, { db: executorFor(conn) })
}

/** The run died with its process: pg-boss retries the job, or fails it after MAX_TRIES; returns which. */
export async function failRun(jobId: string, conn: Conn, reason: string): Promise<JobState | null> {
  const boss = await analysisQueue()
  const executor = executorFor(conn)
  await boss.fail(ANALYSIS_QUEUE, jobId, { reason }, { db: executor })
  const job = await boss.getJobById(ANALYSIS_QUEUE, jobId, { db: executor, includeArchive: true })
  return job ? job.state : null
}

/** For readiness checks: resolves with the number of waiting jobs when the queue answers. */
export async function waitingRuns(): Promise<number> {
  const boss = await analysisQueue()
  return boss.getQueueSize(ANALYSIS_QUEUE)
}

/** The state of a job (tests and diagnostics). */
export async function jobState(jobId: string): Promise<JobState | null> {
  const boss = await analysisQueue()
  const job = await boss.getJobById(ANALYSIS_QUEUE, jobId, { includeArchive: true })
  return job ? job.state : null
}
