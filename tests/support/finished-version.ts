import { AnalysisSettings } from '../../shared/schemas/analyses'
import { computeAnalysis } from '../../server/analysis/compute-analysis'
import { db } from '../../server/db'

/**
 * Runs a queued analysis version in the test process and stores its outcome, as the job runner
 * would: for tests that need a finished version without starting the runner's worker thread.
 */
export async function finishQueuedVersion(analysisId: number, versionNo = 1): Promise<void> {
  const row = await db('analysis_versions')
    .where({ analysis_id: analysisId, version_no: versionNo, status: 'queued' })
    .first('id', 'dataset_version_id', 'settings', 'exclusions')
  if (!row) throw new Error(`version ${versionNo} of analysis ${analysisId} is not queued`)
  const done = await computeAnalysis(
    {
      datasetVersionId: row.dataset_version_id,
      // Stored settings may be engine 0.1's shape: read them as the job runner does.
      settings: AnalysisSettings.parse(row.settings),
      exclusions: row.exclusions,
    },
    db,
  )
  await db('analysis_versions')
    .where({ id: row.id })
    .update({
      status: 'done',
      progress: JSON.stringify({ stage: 'done', fraction: 1 }),
      result: JSON.stringify(done.result),
      chart: JSON.stringify(done.chart),
      run_ms: Math.round(done.runMs),
      started_at: db.fn.now(),
      finished_at: db.fn.now(),
    })
}
