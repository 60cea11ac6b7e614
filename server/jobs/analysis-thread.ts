import { Worker } from 'node:worker_threads'
import { ChartData, type AnalysisProgress, type AnalysisRunError } from '../../shared/schemas/analyses'
import { AnalysisResult } from '../../shared/schemas/analysis-result'
import type { AnalysisJobInput } from '../analysis/compute-analysis'
import { logger } from '../logger'
import type { RunOutcome } from '../services/analysis-runs.service'
import type { FromWorker, ToWorker } from './analysis-messages'

const WORKER_URL = new URL('./analysis-worker-entry.mjs', import.meta.url)

/**
 * One worker thread that runs one analysis at a time off the event loop (TypeScript through tsx,
 * registered by the entry file, so it works under `node --import tsx` and under vitest alike). It
 * is started ahead of its first job (loading the engine takes a moment) and kept for the next;
 * after a thread dies or is stopped, the next run starts a new one.
 */
export class AnalysisThread {
  private worker: Worker | null = null
  private current: {
    id: number
    onProgress: (progress: AnalysisProgress) => void
    resolve: (outcome: RunOutcome) => void
  } | null = null

  warmUp(): void {
    this.ensureWorker()
  }

  /** Runs one analysis; resolves with its outcome (a dead thread is a failed run). */
  run(id: number, input: AnalysisJobInput, onProgress: (p: AnalysisProgress) => void): Promise<RunOutcome> {
    const worker = this.ensureWorker()
    return new Promise<RunOutcome>((resolve) => {
      this.current = { id, onProgress, resolve }
      const message: ToWorker = { type: 'run', jobId: id, input }
      worker.postMessage(message)
    })
  }

  /** Stops the thread (and the run in it, whose promise then never settles). */
  async terminate(): Promise<void> {
    const worker = this.worker
    this.worker = null
    this.current = null
    if (worker) await worker.terminate()
  }

  private ensureWorker(): Worker {
    if (this.worker) return this.worker
    const worker = new Worker(WORKER_URL)
    worker.unref()
    worker.on('message', (message: FromWorker) => this.onMessage(message))
    worker.on('error', (err) => logger.error('analysis worker thread failed', { err }))
    worker.on('exit', (code) => {
      if (this.worker !== worker) return
      this.worker = null
      this.settle({
        kind: 'failed',
        error: {
          code: 'INTERNAL',
          message: `The analysis stopped unexpectedly on the server (worker exit code ${code}).`,
        },
      })
    })
    this.worker = worker
    return worker
  }

  private settle(outcome: RunOutcome): void {
    const current = this.current
    this.current = null
    current?.resolve(outcome)
  }

  private onMessage(message: FromWorker): void {
    if (message.type === 'ready') return
    const current = this.current
    if (!current || current.id !== message.jobId) return
    if (message.type === 'progress') current.onProgress(message.progress)
    else if (message.type === 'failed') this.settle({ kind: 'failed', error: message.error })
    else {
      current.onProgress({ stage: 'saving', fraction: 0.97 })
      this.settle(checkOutcome(message.result, message.chart, message.runMs))
    }
  }
}

/** Stores only what the shared schemas accept, so the client can always parse a stored result. */
function checkOutcome(result: unknown, chart: unknown, runMs: number): RunOutcome {
  const r = AnalysisResult.safeParse(result)
  const c = ChartData.safeParse(chart)
  if (r.success && c.success) return { kind: 'done', result: r.data, chart: c.data, runMs }
  logger.error('analysis outcome does not match its schema', {
    issues: [...(r.error?.issues ?? []), ...(c.error?.issues ?? [])].slice(0, 5),
  })
  const error: AnalysisRunError = {
    code: 'INTERNAL',
    message: 'The analysis produced a result the server could not store. The details are in the server log.',
  }
  return { kind: 'failed', error }
}
