import type { AnalysisRunError, ChartData } from '../../shared/schemas/analyses'
import type { AnalysisResult } from '../../shared/schemas/analysis-result'
import { db } from '../db'
import { completeRun, failRun, fetchRun, MAX_TRIES, sendRun, type QueuedRun } from '../queue/analysis-queue'
import { logger } from '../logger'
import {
  failRunningVersion,
  finishRun,
  lockOrphanedRuns,
  lockVersionsWithoutJob,
  requeueVersion,
  setVersionJob,
  startRun,
  type StartedRun,
} from '../repositories/analysis-jobs.repo'
import type { Conn } from '../repositories/connection'

/**
 * The life of an analysis run between the version row and its pg-boss job; each step writes both
 * in one transaction, so a version never says "queued" without a job, nor "done" with a job that
 * will run again. The threads, timers and locks of a run are the runner's (jobs/analysis-runner).
 */

export type RunOutcome =
  | { kind: 'done'; result: AnalysisResult; chart: ChartData; runMs: number }
  | { kind: 'failed'; error: AnalysisRunError }

/** Queues a new version (inside the transaction that created it). */
export async function queueVersion(versionId: number, trx: Conn): Promise<void> {
  const jobId = await sendRun(versionId, trx)
  if (jobId) await setVersionJob(versionId, jobId, trx)
}

export type Claim =
  | { kind: 'none' }
  /** The version's run lock is held by a live run elsewhere: the job waits for later. */
  | { kind: 'busy'; job: QueuedRun }
  /** The job's version needs no run (finished, or given another job): the job was completed. */
  | { kind: 'stale'; job: QueuedRun }
  | { kind: 'run'; job: QueuedRun; run: StartedRun }

class LockBusy extends Error {}

/**
 * Takes the next job and marks its version running under `claimToken`, in one transaction, with
 * the version's run lock taken (`holdLock`, on the runner's own connection) before it commits: a
 * process that dies before the commit leaves the job waiting and the version queued, one that
 * dies after it leaves a running version whose lock is free, which takeBackOrphanedRuns finds.
 */
export async function claimNextRun(
  claimToken: string,
  holdLock: (versionId: number) => Promise<boolean>,
): Promise<Claim> {
  try {
    return await db.transaction(async (trx): Promise<Claim> => {
      const job = await fetchRun(trx)
      if (!job) return { kind: 'none' }
      if (!(await holdLock(job.versionId))) throw new LockBusy(JSON.stringify(job))
      const run = await startRun({ ...job, claimToken }, trx)
      if (run) return { kind: 'run', job, run }
      await completeRun(job.jobId, trx)
      return { kind: 'stale', job }
    })
  } catch (error) {
    // Rolled back: the job is waiting again, untouched.
    if (error instanceof LockBusy) return { kind: 'busy', job: JSON.parse(error.message) as QueuedRun }
    throw error
  }
}

/** Stores what a run produced and ends its job; false when the run was no longer the version's. */
export async function storeOutcome(run: StartedRun, outcome: RunOutcome): Promise<boolean> {
  return db.transaction(async (trx) => {
    const stored =
      outcome.kind === 'done'
        ? await finishRun(run.versionId, run.claimToken, outcome, trx)
        : await failRunningVersion(run.versionId, run.claimToken, outcome.error, trx)
    if (stored) await completeRun(run.jobId, trx)
    return stored
  })
}

/**
 * A run stopped by its own process (shutting down): its job ends and a fresh one takes its place,
 * so the version starts again elsewhere or after the restart, and the stop does not count as a try.
 */
export async function handBack(run: StartedRun): Promise<void> {
  await db.transaction(async (trx) => {
    await completeRun(run.jobId, trx)
    const jobId = await sendRun(run.versionId, trx)
    if (!jobId) throw new Error(`version ${run.versionId} already has a waiting job`)
    await requeueVersion(run.versionId, { claimToken: run.claimToken, jobId }, trx)
  })
}

function gaveUp(tries: number): AnalysisRunError {
  return {
    code: 'INTERNAL',
    message: `The server stopped while running this analysis ${tries} times, so it was not tried again. Create a new version to retry.`,
  }
}

/**
 * Runs whose process is gone go back to the queue through pg-boss's retry, or are failed once they
 * have been started MAX_TRIES times. Returns what happened to each, for the log.
 */
export async function takeBackOrphanedRuns(): Promise<{ id: number; now: 'queued' | 'failed' }[]> {
  return db.transaction(async (trx) => {
    const out: { id: number; now: 'queued' | 'failed' }[] = []
    for (const orphan of await lockOrphanedRuns(trx)) {
      const state = await failRun(orphan.jobId, trx, 'the process running it stopped')
      if (state === 'retry' || state === 'created') {
        await requeueVersion(orphan.id, { claimToken: null, jobId: orphan.jobId }, trx)
        out.push({ id: orphan.id, now: 'queued' })
      } else if (state === 'failed') {
        await failRunningVersion(orphan.id, null, gaveUp(MAX_TRIES), trx)
        out.push({ id: orphan.id, now: 'failed' })
      } else {
        // The job is gone or already ended (pg-boss storage cleared): give the version a new one.
        const jobId = await sendRun(orphan.id, trx)
        if (jobId) await requeueVersion(orphan.id, { claimToken: null, jobId }, trx)
        out.push({ id: orphan.id, now: 'queued' })
      }
    }
    return out
  })
}

/** Versions left queued or running without a job (stored before the move to pg-boss) get one. */
export async function adoptVersionsWithoutJob(): Promise<number> {
  const adopted = await db.transaction(async (trx) => {
    const ids = await lockVersionsWithoutJob(trx)
    for (const id of ids) {
      const jobId = await sendRun(id, trx)
      if (jobId) await requeueVersion(id, { claimToken: null, jobId }, trx)
    }
    return ids.length
  })
  if (adopted) logger.info('queued analysis versions that had no job', { count: adopted })
  return adopted
}
