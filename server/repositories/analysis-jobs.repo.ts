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
 * The analysis job queue: queued analysis_versions rows. Several server processes may run
 * runners against the same database; `FOR UPDATE SKIP LOCKED` hands each queued row to exactly
 * one of them, and every later write names the claim token, so a runner whose job was taken
 * back (lease expired) cannot overwrite the new attempt.
 */

export interface ClaimedJob {
  id: number
  claimToken: string
  attempts: number
  datasetVersionId: number
  settings: AnalysisSettings
  exclusions: RecordedExclusion[]
}

export async function claimNextJob(claimToken: string, conn: Conn = defaultConn): Promise<ClaimedJob | null> {
  const { rows } = await conn.raw(
    `UPDATE analysis_versions
        SET status = 'running', claim_token = :claimToken, heartbeat_at = now(), attempts = attempts + 1,
            started_at = now(), progress = :progress::jsonb
      WHERE id = (SELECT id FROM analysis_versions WHERE status = 'queued'
                   ORDER BY created_at, id FOR UPDATE SKIP LOCKED LIMIT 1)
  RETURNING id, attempts, dataset_version_id, settings, exclusions`,
    { claimToken, progress: JSON.stringify({ stage: 'reading', fraction: 0 }) },
  )
  const row = rows[0] as
    | {
        id: number
        attempts: number
        dataset_version_id: number
        settings: unknown
        exclusions: RecordedExclusion[]
      }
    | undefined
  return row
    ? {
        id: row.id,
        claimToken,
        attempts: row.attempts,
        datasetVersionId: row.dataset_version_id,
        // A version queued before an upgrade may hold engine 0.1 settings: read in today's shape.
        settings: AnalysisSettings.parse(row.settings),
        exclusions: row.exclusions,
      }
    : null
}

/** Progress and heartbeat in one write; false when the job is no longer ours. */
export async function recordProgress(
  id: number,
  claimToken: string,
  progress: AnalysisProgress | null,
  conn: Conn = defaultConn,
): Promise<boolean> {
  const changes: Record<string, unknown> = { heartbeat_at: conn.fn.now() }
  if (progress) changes.progress = JSON.stringify(progress)
  const count = await conn('analysis_versions')
    .where({ id, claim_token: claimToken, status: 'running' })
    .update(changes)
  return count === 1
}

export async function finishJob(
  id: number,
  claimToken: string,
  done: { result: AnalysisResult; chart: ChartData; runMs: number },
  conn: Conn = defaultConn,
): Promise<boolean> {
  const count = await conn('analysis_versions')
    .where({ id, claim_token: claimToken, status: 'running' })
    .update({
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

export async function failJob(
  id: number,
  claimToken: string,
  error: AnalysisRunError,
  conn: Conn = defaultConn,
): Promise<boolean> {
  const count = await conn('analysis_versions')
    .where({ id, claim_token: claimToken, status: 'running' })
    .update({
      status: 'failed',
      error: JSON.stringify(error),
      progress: JSON.stringify({ stage: 'failed', fraction: 1 }),
      claim_token: null,
      finished_at: conn.fn.now(),
    })
  return count === 1
}

/** Hands a job back untouched (the runner is stopping); the attempt does not count. */
export async function releaseJob(id: number, claimToken: string, conn: Conn = defaultConn): Promise<boolean> {
  const count = await conn('analysis_versions')
    .where({ id, claim_token: claimToken, status: 'running' })
    .update({
      status: 'queued',
      claim_token: null,
      heartbeat_at: null,
      started_at: null,
      attempts: conn.raw('greatest(attempts - 1, 0)'),
      progress: JSON.stringify({ stage: 'queued', fraction: 0 }),
    })
  return count === 1
}

export interface ReclaimedJob {
  id: number
  status: 'queued' | 'failed'
}

/**
 * Running jobs whose heartbeat is older than the lease belonged to a runner that died (a crash,
 * a kill, a lost connection): back to the queue, or failed once they have been started
 * `maxAttempts` times (a job that keeps killing its process must not loop forever).
 */
export async function reclaimStaleJobs(
  leaseMs: number,
  maxAttempts: number,
  conn: Conn = defaultConn,
): Promise<ReclaimedJob[]> {
  const gaveUp: AnalysisRunError = {
    code: 'INTERNAL',
    message: `The server stopped while running this analysis ${maxAttempts} times, so it was not tried again. Create a new version to retry.`,
  }
  const { rows } = await conn.raw(
    `UPDATE analysis_versions
        SET status = CASE WHEN attempts >= :maxAttempts THEN 'failed' ELSE 'queued' END,
            error = CASE WHEN attempts >= :maxAttempts THEN :gaveUp::jsonb ELSE NULL END,
            progress = CASE WHEN attempts >= :maxAttempts THEN '{"stage":"failed","fraction":1}'::jsonb
                            ELSE '{"stage":"queued","fraction":0}'::jsonb END,
            finished_at = CASE WHEN attempts >= :maxAttempts THEN now() ELSE NULL END,
            started_at = CASE WHEN attempts >= :maxAttempts THEN started_at ELSE NULL END,
            claim_token = NULL,
            heartbeat_at = NULL
      WHERE id IN (SELECT id FROM analysis_versions
                    WHERE status = 'running' AND heartbeat_at < now() - make_interval(secs => :leaseSeconds)
                    FOR UPDATE SKIP LOCKED)
  RETURNING id, status`,
    { maxAttempts, gaveUp: JSON.stringify(gaveUp), leaseSeconds: leaseMs / 1000 },
  )
  return rows as ReclaimedJob[]
}
