import { randomUUID } from 'node:crypto'
import type { AnalysisProgress } from '../../shared/schemas/analyses'
import { config } from '../config'
import { logger } from '../logger'
import { recordProgress, type StartedRun } from '../repositories/analysis-jobs.repo'
import { RunLocks } from '../repositories/analysis-run-locks.repo'
import {
  adoptVersionsWithoutJob,
  claimNextRun,
  handBack,
  storeOutcome,
  takeBackOrphanedRuns,
  type RunOutcome,
} from '../services/analysis-runs.service'
import { analysisQueue } from '../queue/analysis-queue'
import { onRunQueued } from '../queue/run-signal'
import { AnalysisThread } from './analysis-thread'

export interface AnalysisRunnerOptions {
  /** Analyses run at once, each in a thread of its own (ANALYSIS_WORKERS). */
  concurrency?: number
  /** How often an idle slot asks the queue for work (other processes queue versions too). */
  pollMs?: number
  /** How often this process looks for runs whose process is gone. */
  reapEveryMs?: number
  /** A run longer than this is stopped and failed (ANALYSIS_MAX_RUN_MINUTES). */
  maxRunMs?: number
}

const defaults = (): Required<AnalysisRunnerOptions> => ({
  concurrency: 1,
  pollMs: 1000,
  reapEveryMs: 3000,
  maxRunMs: config.ANALYSIS_MAX_RUN_MINUTES * 60_000,
})

/** Why a run ended without an outcome of its own. */
type Abandon = 'hand-back' | 'lost'

interface Flight {
  run: StartedRun
  /** Progress writes, in order. */
  writes: Promise<unknown>
  abandon: (why: Abandon) => void
}

interface Slot {
  thread: AnalysisThread
  flight: Flight | null
  done: Promise<void> | null
}

/**
 * Runs queued analysis versions in this process: `concurrency` slots, each asking pg-boss for the
 * next job and running it in its own worker thread. The main thread holds the run's lock (its
 * proof of life, see RunLocks), relays progress to the version row, stops a run at the time limit,
 * and stores the outcome together with the end of the job (analysis-runs.service). Every few
 * seconds it also takes back runs whose process is gone, in any process on the same database.
 */
export class AnalysisRunner {
  private readonly options: Required<AnalysisRunnerOptions>
  private readonly slots: Slot[]
  private readonly locks = new RunLocks((err) => this.onLocksLost(err))
  private stopping = false
  private sleepers = new Set<() => void>()
  private reaper: NodeJS.Timeout | null = null
  private reaping = false

  constructor(options: AnalysisRunnerOptions = {}) {
    this.options = { ...defaults(), ...options }
    this.slots = Array.from({ length: Math.max(1, this.options.concurrency) }, () => ({
      thread: new AnalysisThread(),
      flight: null,
      done: null,
    }))
  }

  start(): this {
    for (const slot of this.slots) {
      slot.thread.warmUp()
      slot.done ??= this.loop(slot)
    }
    void analysisQueue()
      .then(() => adoptVersionsWithoutJob())
      .catch((err: unknown) => logger.error('analysis queue could not start', { err }))
    this.reaper = setInterval(() => void this.reap(), this.options.reapEveryMs)
    this.reaper.unref()
    return this
  }

  /** Look for work now (a version was just queued in this process). */
  wake(): void {
    for (const wakeUp of [...this.sleepers]) wakeUp()
  }

  /** Stops taking jobs; runs in flight go back to the queue (not counted as a try). */
  async stop(): Promise<void> {
    this.stopping = true
    if (this.reaper) clearInterval(this.reaper)
    for (const slot of this.slots) slot.flight?.abandon('hand-back')
    this.wake()
    await Promise.all(this.slots.map((slot) => slot.done))
    await Promise.all(this.slots.map((slot) => slot.thread.terminate()))
    await this.locks.close()
  }

  private async loop(slot: Slot): Promise<void> {
    while (!this.stopping) {
      let worked = false
      try {
        worked = await this.claimAndRun(slot)
      } catch (err) {
        if (this.stopping) break
        logger.error('analysis runner could not reach the queue', { err })
      }
      if (!worked && !this.stopping) await this.sleep(this.options.pollMs)
    }
  }

  private sleep(ms: number): Promise<void> {
    return new Promise((resolve) => {
      const done = () => {
        clearTimeout(timer)
        this.sleepers.delete(done)
        resolve()
      }
      const timer = setTimeout(done, ms)
      this.sleepers.add(done)
    })
  }

  /** Claims the next job and runs it; false when there was nothing this slot could run. */
  private async claimAndRun(slot: Slot): Promise<boolean> {
    let locked: number | null = null
    const holdLock = async (versionId: number) => {
      const held = await this.locks.hold(versionId)
      if (held) locked = versionId
      return held
    }
    try {
      const claim = await claimNextRun(randomUUID(), holdLock)
      if (claim.kind === 'none') return false
      if (claim.kind === 'busy') {
        // pg-boss expired a run that is still alive elsewhere; its job waits until that run ends.
        logger.warn('an analysis is still running elsewhere; its job waits', { ...claim.job })
        return false
      }
      if (claim.kind === 'stale') return true
      const { job, run } = claim
      // Claimed while stopping: straight back to the queue.
      if (this.stopping) {
        await handBack(run)
        return true
      }
      if (job.tryNo > 1) logger.warn('running an analysis again after its process stopped', { ...job })
      const outcome = await this.execute(slot, run)
      if (outcome === 'hand-back') await handBack(run)
      else if (outcome !== 'lost' && !(await storeOutcome(run, outcome)))
        logger.warn('an analysis run was taken over elsewhere; its outcome was dropped', { ...job })
      return true
    } finally {
      if (locked !== null) await this.locks.release(locked)
    }
  }

  /** The run in the slot's thread, with its progress and time limit; or why it was abandoned. */
  private execute(slot: Slot, run: StartedRun): Promise<RunOutcome | Abandon> {
    return new Promise<RunOutcome | Abandon>((resolve) => {
      let ended = false
      const end = (result: RunOutcome | Abandon) => {
        if (ended) return
        ended = true
        clearTimeout(timer)
        slot.flight = null
        const writes = flight.writes
        if (typeof result === 'string') void slot.thread.terminate()
        void writes.then(() => resolve(result))
      }
      const flight: Flight = { run, writes: Promise.resolve(), abandon: end }
      slot.flight = flight
      const timer = setTimeout(() => {
        void slot.thread.terminate()
        end({
          kind: 'failed',
          error: {
            code: 'INTERNAL',
            message: `The analysis took longer than ${duration(this.options.maxRunMs)} and was stopped.`,
          },
        })
      }, this.options.maxRunMs)
      const onProgress = (progress: AnalysisProgress) => {
        flight.writes = flight.writes
          .then(() => recordProgress(run.versionId, run.claimToken, progress))
          .then((stillOurs) => {
            if (!stillOurs) end('lost')
          })
          .catch((err: unknown) =>
            logger.error('could not record analysis progress', { versionId: run.versionId, err }),
          )
      }
      const input = {
        datasetVersionId: run.datasetVersionId,
        settings: run.settings,
        exclusions: run.exclusions,
      }
      void slot.thread.run(run.versionId, input, onProgress).then(end)
    })
  }

  private onLocksLost(err: unknown): void {
    const running = this.slots.filter((slot) => slot.flight)
    if (this.stopping || !running.length) return
    logger.error('lost the run-lock connection; abandoning runs for another process to take back', { err })
    for (const slot of running) slot.flight?.abandon('lost')
  }

  private async reap(): Promise<void> {
    if (this.reaping || this.stopping) return
    this.reaping = true
    try {
      const taken = await takeBackOrphanedRuns()
      for (const run of taken)
        logger.warn('took back an analysis run whose process stopped', { versionId: run.id, now: run.now })
      const adopted = await adoptVersionsWithoutJob()
      if (adopted || taken.some((run) => run.now === 'queued')) this.wake()
    } catch (err) {
      logger.warn('could not look for orphaned analysis runs', { err })
    } finally {
      this.reaping = false
    }
  }
}

const duration = (ms: number) =>
  ms >= 60_000 ? `${+(ms / 60_000).toFixed(1)} minutes` : `${+(ms / 1000).toFixed(2)} seconds`

// ---------------------------------------------------------------- the process-wide runner

let runner: AnalysisRunner | null = null
let stopListening: (() => void) | null = null

/**
 * Starts this process's runner (server/index.ts, server/worker.ts; tests with short timings); a
 * version queued in this process starts at once (signalRunQueued).
 */
export function startAnalysisRunner(options: AnalysisRunnerOptions = {}): AnalysisRunner {
  if (!runner) {
    const started = new AnalysisRunner(options).start()
    runner = started
    stopListening = onRunQueued(() => started.wake())
  }
  return runner
}

export async function stopAnalysisRunner(): Promise<void> {
  const current = runner
  runner = null
  stopListening?.()
  stopListening = null
  await current?.stop()
}
