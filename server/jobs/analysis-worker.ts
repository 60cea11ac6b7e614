import { parentPort } from 'node:worker_threads'
import { computeAnalysis } from '../analysis/compute-analysis'
import { db } from '../db'
import { logger } from '../logger'
import { classifyRunError } from './classify-run-error'
import type { FromWorker, ToWorker } from './analysis-messages'

/**
 * The analysis worker thread: runs one job at a time off the server's event loop, with its own
 * small database pool for the read-back, and reports progress and the outcome to the runner,
 * which owns every write to the job's row.
 */
if (!parentPort) throw new Error('analysis-worker.ts must run as a worker thread')
const port = parentPort
const send = (message: FromWorker) => port.postMessage(message)

port.on('message', (message: ToWorker) => {
  if (message.type !== 'run') return
  const { jobId, input } = message
  computeAnalysis(input, db, (progress) => send({ type: 'progress', jobId, progress }))
    .then(({ result, chart, runMs }) => send({ type: 'done', jobId, result, chart, runMs }))
    .catch((err: unknown) => {
      const error = classifyRunError(err)
      if (error.code === 'INTERNAL') logger.error('analysis run failed', { jobId, err })
      send({ type: 'failed', jobId, error })
    })
})

send({ type: 'ready' })
