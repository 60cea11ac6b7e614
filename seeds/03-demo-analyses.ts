import type { Knex } from 'knex'
import { AnalysisSettings, type AnalysisSettingsPatch } from '../shared/schemas/analyses'
import { ENGINE_VERSION } from '../shared/stats/engine-version'
import { computeAnalysis } from '../server/analysis/compute-analysis'
import { classifyRunError } from '../server/jobs/classify-run-error'
import {
  insertAnalysis,
  insertAnalysisVersion,
  type RecordedExclusion,
} from '../server/repositories/analyses.repo'
import { activeExclusions } from '../server/repositories/datasets-annotations.repo'
import { listColumns } from '../server/repositories/datasets.repo'
import { mergeSettings, settingsFromTagging } from '../server/services/analysis-settings.service'
import { demoDatasets } from './data/demo-datasets'

/** What each demo dataset's first analysis is called and how it differs from the tagging's defaults. */
const DEMO_ANALYSES: Record<string, { name: string; settings: AnalysisSettingsPatch }> = {
  'Outgrowth, single lab (NW-117 vs vehicle)': {
    name: 'Neurite length, NW-117 vs vehicle',
    settings: {
      reference: { treatment: 'vehicle' },
      bootstrap: { enabled: true, resamples: 2000, seed: 'demo' },
    },
  },
  'Consortium outgrowth, three labs': {
    name: 'Neurite length across three labs',
    settings: { reference: { treatment: 'vehicle' } },
  },
  'Within-mouse coverslips': {
    name: 'Coverslips within mice',
    settings: { reference: { treatment: 'untreated' } },
  },
  'Plate reader, three doses': { name: 'Viability by dose', settings: {} },
  'Genotype × treatment, three labs': {
    name: 'Neurite length by genotype and treatment, adjusted for soma area',
    settings: {
      conditions: ['genotype', 'treatment'],
      covariates: ['soma_area_um2'],
      reference: { genotype: 'WT', treatment: 'vehicle' },
    },
  },
}

/**
 * One finished analysis per demo dataset, so the result page has something to show right after
 * `npm start`. Computed here, directly (the datasets are small), with the same pipeline the job
 * runner uses. A run the engine refuses is stored as a failed version with the engine's words
 * (engine 0.1 refuses the two-factor demo: it fits one factor and no covariate), so seeding never
 * stops on it. Idempotent: a dataset that already has an analysis is left alone. Runs after
 * 02-demo-datasets.
 */
export async function seed(knex: Knex): Promise<void> {
  for (const demo of demoDatasets()) {
    const plan = DEMO_ANALYSES[demo.name]
    if (!plan) continue
    const dataset = await knex('datasets as d')
      .join('labs as l', 'l.id', 'd.lab_id')
      .where({ 'l.slug': demo.labSlug, 'd.name': demo.name })
      .whereNull('d.deleted_at')
      .first('d.id', 'd.lab_id', 'd.project_id')
    if (!dataset) throw new Error(`demo analyses need the demo dataset “${demo.name}” first (seed 02)`)
    if (await knex('analyses').where({ dataset_id: dataset.id }).first('id')) continue
    const version = await knex('dataset_versions')
      .where({ dataset_id: dataset.id, status: 'ready' })
      .orderBy('version_no', 'desc')
      .first('id', 'sha256')
    const user = await knex('users').where({ email: demo.uploaderEmail }).first('id')
    const settings: AnalysisSettings = mergeSettings(
      settingsFromTagging({ tagging: demo.tagging, columns: await listColumns(version.id, knex) }),
      plan.settings,
    )
    const exclusions: RecordedExclusion[] = (await activeExclusions(version.id, knex)).map(
      ({ id, kind, reason, matchedRows, rule, unit }) => ({ id, kind, reason, matchedRows, rule, unit }),
    )

    let finished: Parameters<typeof insertAnalysisVersion>[0]['finished']
    try {
      finished = await computeAnalysis({ datasetVersionId: version.id, settings, exclusions }, knex)
    } catch (err) {
      finished = { error: classifyRunError(err) }
      console.warn(`[seed] demo analysis “${plan.name}” failed: ${finished.error.message}`)
    }
    await knex.transaction(async (trx) => {
      const analysisId = await insertAnalysis(
        {
          labId: dataset.lab_id,
          projectId: dataset.project_id,
          datasetId: dataset.id,
          name: plan.name,
          createdBy: user.id,
        },
        trx,
      )
      await insertAnalysisVersion(
        {
          analysisId,
          versionNo: 1,
          datasetVersionId: version.id,
          datasetSha256: version.sha256,
          settings,
          exclusions,
          engineVersion: ENGINE_VERSION,
          createdBy: user.id,
          finished,
        },
        trx,
      )
    })
  }
}
