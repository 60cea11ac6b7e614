import type { AnalysisProgress, AnalysisRunError, ChartData } from '../../shared/schemas/analyses'
import type { AnalysisResult } from '../../shared/schemas/analysis-result'
import type { AnalysisJobInput } from '../analysis/compute-analysis'

/** What the runner (main thread) and the analysis worker thread say to each other. */
export type ToWorker = { type: 'run'; jobId: number; input: AnalysisJobInput }

export type FromWorker =
  | { type: 'ready' }
  | { type: 'progress'; jobId: number; progress: AnalysisProgress }
  | { type: 'done'; jobId: number; result: AnalysisResult; chart: ChartData; runMs: number }
  | { type: 'failed'; jobId: number; error: AnalysisRunError }
