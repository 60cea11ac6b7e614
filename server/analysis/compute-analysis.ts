import type { AnalysisProgress, AnalysisSettings, ChartData } from '../../shared/schemas/analyses'
import type { AnalysisResult } from '../../shared/schemas/analysis-result'
import type { Exclusion } from '../../shared/schemas/datasets'
import { analyzeNested } from '../../shared/analysis/analyze-nested'
import type { Conn } from '../repositories/connection'
import { loadNestedColumns } from '../rows-store/read-back'
import { buildChartData } from '../../shared/analysis/chart-data'

export interface AnalysisJobInput {
  datasetVersionId: number
  settings: AnalysisSettings
  /** The exclusions recorded with the analysis version (not the dataset's current ones). */
  exclusions: Pick<Exclusion, 'kind' | 'rule' | 'unit'>[]
}

export interface ComputedAnalysis {
  result: AnalysisResult
  chart: ChartData
  /** Wall time of read-back, engine and charts. */
  runMs: number
}

/**
 * Rough share of the run each stage starts at, for a progress bar (measured on a million rows:
 * read-back about half, the model a third, bootstrap and charts the rest).
 */
const STAGE_START: Record<'reading' | 'fitting' | 'bootstrap' | 'charts', number> = {
  reading: 0.02,
  fitting: 0.5,
  bootstrap: 0.8,
  charts: 0.9,
}

/**
 * One analysis run: read the version's kept rows, run the engine (its bootstrap reported as a
 * stage of its own), build the chart data. Throws EngineInputError for data too thin for the model and
 * UnprocessableError (from the read-back) for rows the engine cannot take; callers classify.
 * Runs in the analysis worker thread, and in the demo seed directly.
 */
export async function computeAnalysis(
  input: AnalysisJobInput,
  conn: Conn,
  report: (progress: AnalysisProgress) => void = () => {},
): Promise<ComputedAnalysis> {
  const started = performance.now()
  const { settings } = input
  report({ stage: 'reading', fraction: STAGE_START.reading })
  const columns = await loadNestedColumns(
    input.datasetVersionId,
    {
      response: settings.response,
      conditions: settings.conditions,
      covariates: settings.covariates,
      levels: settings.levels,
      family: settings.family,
      trials: settings.trials,
      positive: settings.positive,
    },
    input.exclusions,
    conn,
  )
  report({ stage: 'fitting', fraction: STAGE_START.fitting })
  const { outcome, ...engineColumns } = columns
  const result = analyzeNested(engineColumns, {
    reference: settings.reference,
    // The engine has no bootstrap for successes out of trials (the settings refuse one, too).
    bootstrap:
      settings.bootstrap.enabled && settings.trials === null
        ? { resamples: settings.bootstrap.resamples, seed: settings.bootstrap.seed }
        : null,
    beforeBootstrap: () => report({ stage: 'bootstrap', fraction: STAGE_START.bootstrap }),
  })
  // Which of the response's two values was counted as yes, so the result says so wherever it goes.
  if (outcome) result.outcome = outcome
  report({ stage: 'charts', fraction: STAGE_START.charts })
  const chart = buildChartData(engineColumns, result)
  return { result, chart, runMs: Math.round(performance.now() - started) }
}
