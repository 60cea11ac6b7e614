import { randomUUID } from 'node:crypto'
import { Worker } from 'node:worker_threads'
import { ChartData, type AnalysisProgress, type AnalysisRunError } from '../../shared/schemas/analyses'
import { AnalysisResult } from '../../shared/schemas/analysis-result'
import { logger } from '../logger'
import {
  claimNextJob,
  failJob,
  finishJob,
  reclaimStaleJobs,
  recordProgress,
  releaseJob,
  type ClaimedJob,
} from '../repositories/analysis-jobs.repo'
import type { FromWorker, ToWorker } from './analysis-messages'

export interface AnalysisRunnerOptions {
  /** How often an idle runner looks for queued jobs (other processes may queue them). */
  pollMs?: number
  /** A running job whose heartbeat is older than this is taken back. */
  leaseMs?: number
  /** How often a running job proves it is alive (well below the lease). */
  heartbeatMs?: number
  /** Starts after which a job that keeps dying is failed instead of queued again. */
  maxAttempts?: number
  /** A run longer than this is stopped and failed. */
  maxRunMs?: number
}

const DEFAULTS: Required<AnalysisRunnerOptions> = {
  pollMs: 1000,
  leaseMs: 30_000,
  heartbeatMs: 5000,
  maxAttempts: 3,
  maxRunMs: 15 * 60_000,
}

const WORKER_URL = new URL('./analysis-worker-entry.mjs', import.meta.url)

interface InFlight {
  job: ClaimedJob
  /** Database writes for this job, in order (progress, then the outcome). */
  writes: Promise<unknown>
  settle: () => void
  timers: NodeJS.Timeout[]
  /** Set once an outcome is being stored; later signals (a worker exit after a timeout) are ignored. */
  ending: boolean
}

/**
 * Runs queued analysis versions, one at a time per process, in a worker thread (TypeScript via
 * tsx, registered by the worker's entry file, so it works under `node --import tsx` and under
 * vitest alike). The main thread only
 * claims jobs, relays progress to the job's row, keeps the heartbeat, and stores the outcome
 * after checking it against the shared schemas. Several processes share the queue through
 * PostgreSQL (see analysis-jobs.repo); a job whose runner died is taken back after the lease.
 */
export class AnalysisRunner {
  private readonly options: Required<AnalysisRunnerOptions>
  private worker: Worker | null = null
  private inFlight: InFlight | null = null
  private stopping = false
  private woken = false
  private wakeSleeper: (() => void) | null = null
  private lastReclaim = 0
  private loopDone: Promise<void> | null = null

  constructor(options: AnalysisRunnerOptions = {}) {
    this.options = { ...DEFAULTS, ...options }
  }

  /** Starts the worker thread at once (loading the engine takes seconds), then the claim loop. */
  start(): this {
    this.ensureWorker()
    this.loopDone ??= this.loop()
    return this
  }

  /** Look for work now (called after a version is queued in this process). */
  wake(): void {
    this.woken = true
    this.wakeSleeper?.()
  }

  /** Stops claiming; a job in flight is handed back to the queue, not failed. */
  async stop(): Promise<void> {
    this.stopping = true
    this.wake()
    const running = this.inFlight
    if (running) {
      this.inFlight = null
      running.timers.forEach(clearTimeout)
      await this.terminateWorker()
      await running.writes.catch(() => {})
      await releaseJob(running.job.id, running.job.claimToken).catch((err: unknown) =>
        logger.error('could not hand an analysis job back', { jobId: running.job.id, err }),
      )
      running.settle()
    }
    await this.loopDone
    await this.terminateWorker()
  }

  private async loop(): Promise<void> {
    while (!this.stopping) {
      this.woken = false
      try {
        await this.reclaimIfDue()
        const job = await claimNextJob(randomUUID())
        if (job) {
          await this.run(job)
          continue
        }
      } catch (err) {
        if (this.stopping) break
        logger.error('analysis runner could not reach the queue', { err })
      }
      if (!this.woken && !this.stopping) await this.sleep(this.options.pollMs)
    }
  }

  private async reclaimIfDue(): Promise<void> {
    const now = Date.now()
    if (now - this.lastReclaim < this.options.leaseMs / 2) return
    this.lastReclaim = now
    const reclaimed = await reclaimStaleJobs(this.options.leaseMs, this.options.maxAttempts)
    for (const job of reclaimed)
      logger.warn('took back an analysis job whose runner stopped', { jobId: job.id, now: job.status })
  }

  private sleep(ms: number): Promise<void> {
    return new Promise((resolve) => {
      const done = () => {
        clearTimeout(timer)
        this.wakeSleeper = null
        resolve()
      }
      const timer = setTimeout(done, ms)
      this.wakeSleeper = done
    })
  }

  private run(job: ClaimedJob): Promise<void> {
    const worker = this.ensureWorker()
    return new Promise<void>((resolve) => {
      const flight: InFlight = { job, writes: Promise.resolve(), settle: resolve, timers: [], ending: false }
      this.inFlight = flight
      flight.timers.push(
        setInterval(() => this.writeProgress(flight, null), this.options.heartbeatMs),
        setTimeout(() => {
          const minutes = Math.round(this.options.maxRunMs / 60_000)
          void this.terminateWorker()
          this.finish(flight, {
            kind: 'failed',
            error: {
              code: 'INTERNAL',
              message: `The analysis took longer than ${minutes} minutes and was stopped.`,
            },
          })
        }, this.options.maxRunMs),
      )
      const message: ToWorker = {
        type: 'run',
        jobId: job.id,
        input: { datasetVersionId: job.datasetVersionId, settings: job.settings, exclusions: job.exclusions },
      }
      worker.postMessage(message)
    })
  }

  private ensureWorker(): Worker {
    if (this.worker) return this.worker
    const worker = new Worker(WORKER_URL)
    worker.unref()
    worker.on('message', (message: FromWorker) => this.onMessage(message))
    worker.on('error', (err) => logger.error('analysis worker thread failed', { err }))
    worker.on('exit', (code) => {
      if (this.worker === worker) this.worker = null
      const flight = this.inFlight
      if (flight && !this.stopping) {
        this.finish(flight, {
          kind: 'failed',
          error: {
            code: 'INTERNAL',
            message: `The analysis stopped unexpectedly on the server (worker exit code ${code}).`,
          },
        })
      }
    })
    this.worker = worker
    return worker
  }

  private async terminateWorker(): Promise<void> {
    const worker = this.worker
    this.worker = null
    if (worker) await worker.terminate()
  }

  private onMessage(message: FromWorker): void {
    if (message.type === 'ready') return
    const flight = this.inFlight
    if (!flight || flight.job.id !== message.jobId) return
    if (message.type === 'progress') this.writeProgress(flight, message.progress)
    else if (message.type === 'failed') this.finish(flight, { kind: 'failed', error: message.error })
    else {
      this.writeProgress(flight, { stage: 'saving', fraction: 0.97 })
      const checked = checkOutcome(message.result, message.chart)
      this.finish(
        flight,
        checked.ok
          ? { kind: 'done', result: checked.result, chart: checked.chart, runMs: message.runMs }
          : { kind: 'failed', error: checked.error },
      )
    }
  }

  private writeProgress(flight: InFlight, progress: AnalysisProgress | null): void {
    flight.writes = flight.writes
      .then(() => recordProgress(flight.job.id, flight.job.claimToken, progress))
      .then((stillOurs) => {
        if (!stillOurs && this.inFlight === flight) {
          // Taken back (our heartbeat lapsed) and perhaps running elsewhere: drop this attempt.
          logger.warn('lost an analysis job to another runner; dropping this attempt', {
            jobId: flight.job.id,
          })
          void this.terminateWorker()
          this.settle(flight)
        }
      })
      .catch((err: unknown) =>
        logger.error('could not record analysis progress', { jobId: flight.job.id, err }),
      )
  }

  private finish(
    flight: InFlight,
    outcome:
      | { kind: 'done'; result: AnalysisResult; chart: ChartData; runMs: number }
      | { kind: 'failed'; error: AnalysisRunError },
  ): void {
    if (this.inFlight !== flight || flight.ending) return
    flight.ending = true
    flight.timers.forEach(clearTimeout)
    flight.writes = flight.writes
      .then(() =>
        outcome.kind === 'done'
          ? finishJob(flight.job.id, flight.job.claimToken, {
              result: outcome.result,
              chart: outcome.chart,
              runMs: outcome.runMs,
            })
          : failJob(flight.job.id, flight.job.claimToken, outcome.error),
      )
      .catch((err: unknown) =>
        logger.error('could not store the outcome of an analysis', { jobId: flight.job.id, err }),
      )
      .finally(() => this.settle(flight))
  }

  private settle(flight: InFlight): void {
    if (this.inFlight !== flight) return
    flight.timers.forEach(clearTimeout)
    this.inFlight = null
    flight.settle()
  }
}

type Checked = { ok: true; result: AnalysisResult; chart: ChartData } | { ok: false; error: AnalysisRunError }

/** Stores only what the shared schemas accept, so the client can always parse a stored result. */
function checkOutcome(result: unknown, chart: unknown): Checked {
  const r = AnalysisResult.safeParse(result)
  const c = ChartData.safeParse(chart)
  if (r.success && c.success) return { ok: true, result: r.data, chart: c.data }
  logger.error('analysis outcome does not match its schema', {
    issues: [...(r.error?.issues ?? []), ...(c.error?.issues ?? [])].slice(0, 5),
  })
  return {
    ok: false,
    error: {
      code: 'INTERNAL',
      message:
        'The analysis produced a result the server could not store. The details are in the server log.',
    },
  }
}

// ---------------------------------------------------------------- the process-wide runner

let runner: AnalysisRunner | null = null

/** Starts this process's runner (server/index.ts; integration tests with short timings). */
export function startAnalysisRunner(options: AnalysisRunnerOptions = {}): AnalysisRunner {
  runner ??= new AnalysisRunner(options).start()
  return runner
}

export async function stopAnalysisRunner(): Promise<void> {
  const current = runner
  runner = null
  await current?.stop()
}

/** After queuing a version: start it now if this process runs analyses; otherwise a runner elsewhere polls. */
export function wakeAnalysisRunner(): void {
  runner?.wake()
}
