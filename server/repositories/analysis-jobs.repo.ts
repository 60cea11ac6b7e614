import {
  type AnalysisProgress,
  type AnalysisRunError,
  AnalysisSettings,
  type ChartData,
} from '../../shared/schemas/analyses'
import type { AnalysisResult } from '../../shared/schemas/analysis-result'
import type { RecordedExclusion } from './analyses.repo'
import { defaultConn, type Conn } from './connection'

/**
 * What a run writes on its analysis version: the queue itself is pg-boss (queue/analysis-queue.ts),
 * the row holds what people see. A run names itself with a claim token when it starts; every later
 * write names it too, so a run whose process was given up on (and whose job runs elsewhere now)
 * cannot overwrite the newer run.
 */

export interface StartedRun {
  versionId: number
  jobId: string
  claimToken: string
  datasetVersionId: number
  settings: AnalysisSettings
  exclusions: RecordedExclusion[]
}

const QUEUED = JSON.stringify({ stage: 'queued', fraction: 0 })

/** Names the pg-boss job of a version (in the transaction that queued it). */
export async function setVersionJob(versionId: number, jobId: string, conn: Conn): Promise<void> {
  await conn('analysis_versions').where({ id: versionId }).update({ job_id: jobId })
}

/**
 * Marks a version running under `claimToken`, when `jobId` is still its job and it is not finished;
 * null otherwise (the job is stale and only needs completing).
 */
export async function startRun(
  run: { versionId: number; jobId: string; claimToken: string; tryNo: number },
  conn: Conn = defaultConn,
): Promise<StartedRun | null> {
  const [row] = (await conn('analysis_versions')
    .where({ id: run.versionId, job_id: run.jobId })
    .whereIn('status', ['queued', 'running'])
    .update({
      status: 'running',
      claim_token: run.claimToken,
      attempts: run.tryNo,
      started_at: conn.fn.now(),
      progress: JSON.stringify({ stage: 'reading', fraction: 0 }),
    })
    .returning(['dataset_version_id', 'settings', 'exclusions'])) as {
    dataset_version_id: number
    settings: unknown
    exclusions: RecordedExclusion[]
  }[]
  if (!row) return null
  return {
    versionId: run.versionId,
    jobId: run.jobId,
    claimToken: run.claimToken,
    datasetVersionId: row.dataset_version_id,
    // A version queued before an upgrade may hold engine 0.1 settings: read in today's shape.
    settings: AnalysisSettings.parse(row.settings),
    exclusions: row.exclusions,
  }
}

const ours = (conn: Conn, id: number, claimToken: string) =>
  conn('analysis_versions').where({ id, claim_token: claimToken, status: 'running' })

/** Progress of a running version; false when the run is no longer ours. */
export async function recordProgress(
  id: number,
  claimToken: string,
  progress: AnalysisProgress,
  conn: Conn = defaultConn,
): Promise<boolean> {
  return (await ours(conn, id, claimToken).update({ progress: JSON.stringify(progress) })) === 1
}

export async function finishRun(
  id: number,
  claimToken: string,
  done: { result: AnalysisResult; chart: ChartData; runMs: number },
  conn: Conn = defaultConn,
): Promise<boolean> {
  const count = await ours(conn, id, claimToken).update({
    status: 'done',
    result: JSON.stringify(done.result),
    chart: JSON.stringify(done.chart),
    run_ms: done.runMs,
    progress: JSON.stringify({ stage: 'done', fraction: 1 }),
    claim_token: null,
    finished_at: conn.fn.now(),
  })
  return count === 1
}

/** Fails a running version; with `claimToken` null, whoever holds it (the run's process is gone). */
export async function failRunningVersion(
  id: number,
  claimToken: string | null,
  error: AnalysisRunError,
  conn: Conn = defaultConn,
): Promise<boolean> {
  const query = conn('analysis_versions').where({ id, status: 'running' })
  if (claimToken !== null) query.where({ claim_token: claimToken })
  const count = await query.update({
    status: 'failed',
    error: JSON.stringify(error),
    progress: JSON.stringify({ stage: 'failed', fraction: 1 }),
    claim_token: null,
    finished_at: conn.fn.now(),
  })
  return count === 1
}

/**
 * Puts a version back in the queue under `jobId` (its new or retried job); with `claimToken` null,
 * whoever held it. The attempt count stays: the next start sets it from the job.
 */
export async function requeueVersion(
  id: number,
  change: { claimToken: string | null; jobId: string },
  conn: Conn = defaultConn,
): Promise<boolean> {
  const query = conn('analysis_versions').where({ id }).whereIn('status', ['queued', 'running'])
  if (change.claimToken !== null) query.where({ claim_token: change.claimToken })
  const count = await query.update({
    status: 'queued',
    job_id: change.jobId,
    claim_token: null,
    started_at: null,
    progress: QUEUED,
  })
  return count === 1
}

/** Unfinished versions without a pg-boss job (queued before the move to pg-boss), locked for `conn`'s transaction. */
export async function lockVersionsWithoutJob(conn: Conn): Promise<number[]> {
  const rows: { id: number }[] = await conn('analysis_versions')
    .whereIn('status', ['queued', 'running'])
    .whereNull('job_id')
    .orderBy('id')
    .forUpdate()
    .skipLocked()
    .select('id')
  return rows.map((r) => r.id)
}

export interface OrphanedRun {
  id: number
  jobId: string
}

/**
 * Running versions whose run lock nobody holds: the process running them is gone (killed, crashed,
 * cut off from the database), since a live run holds its lock from before it marks the row running
 * until after it stores the outcome (analysis-run-locks.repo). Must run in a transaction: the
 * probe takes each free lock for the transaction only, so it is released again at its end.
 */
export async function lockOrphanedRuns(trx: Conn): Promise<OrphanedRun[]> {
  const { rows } = await trx.raw(
    `WITH running AS MATERIALIZED (
       SELECT id, job_id FROM analysis_versions
        WHERE status = 'running' AND job_id IS NOT NULL
        ORDER BY id
          FOR UPDATE SKIP LOCKED)
     SELECT id, job_id FROM running
      WHERE pg_try_advisory_xact_lock(hashtext(:namespace), id::int)`,
    { namespace: RUN_LOCK_NAMESPACE },
  )
  return (rows as { id: number; job_id: string }[]).map((r) => ({ id: r.id, jobId: r.job_id }))
}

/** The advisory-lock namespace of analysis runs (the second key is the version id). */
export const RUN_LOCK_NAMESPACE = 'nestwise-analysis-run'
