import {
  type AnalysisHeadline,
  type AnalysisProgress,
  type AnalysisRunError,
  AnalysisSettings,
  type AnalysisStatus,
  type AnalysisVersionStatus,
  type AnalysisVersionSummary,
  type AppliedExclusion,
  readStoredChart,
  type ChartData,
} from '../../shared/schemas/analyses'
import type { AnalysisResult } from '../../shared/schemas/analysis-result'
import type { Exclusion } from '../../shared/schemas/datasets'
import { defaultConn, preparedQuery, type Conn } from './connection'

const iso = (d: Date) => d.toISOString()
const isoOrNull = (d: Date | null) => (d ? d.toISOString() : null)

// ---------------------------------------------------------------- analyses

/** An analysis with the names shown beside it and its newest version's state. */
export interface AnalysisRecord {
  id: number
  labId: number
  labName: string
  project: { id: number; name: string }
  dataset: { id: number; name: string }
  name: string
  createdBy: { id: number; name: string }
  createdAt: string
  updatedAt: string
  versionCount: number
  latestVersion: {
    versionNo: number
    status: AnalysisStatus
    progress: AnalysisProgress
    finishedAt: string | null
    headline: AnalysisHeadline | null
  }
}

interface AnalysisJoinRow {
  id: number
  lab_id: number
  lab_name: string
  project_id: number
  project_name: string
  dataset_id: number
  dataset_name: string
  name: string
  created_by: number
  creator_name: string
  created_at: Date
  updated_at: Date
  version_count: number
  latest_version_no: number
  latest_status: AnalysisStatus
  latest_progress: AnalysisProgress
  latest_finished_at: Date | null
  headline_n_obs: number | null
  headline_effective_n: number | null
  headline_design_effect: number | null
  headline_min_units: number | null
  headline_warning_count: number | null
}

function toAnalysis(row: AnalysisJoinRow): AnalysisRecord {
  return {
    id: row.id,
    labId: row.lab_id,
    labName: row.lab_name,
    project: { id: row.project_id, name: row.project_name },
    dataset: { id: row.dataset_id, name: row.dataset_name },
    name: row.name,
    createdBy: { id: row.created_by, name: row.creator_name },
    createdAt: iso(row.created_at),
    updatedAt: iso(row.updated_at),
    versionCount: Number(row.version_count),
    latestVersion: {
      versionNo: row.latest_version_no,
      status: row.latest_status,
      progress: row.latest_progress,
      finishedAt: isoOrNull(row.latest_finished_at),
      headline:
        row.headline_n_obs === null
          ? null
          : {
              nObs: Number(row.headline_n_obs),
              effectiveN: Number(row.headline_effective_n),
              designEffect: Number(row.headline_design_effect),
              minUnitsPerCondition: row.headline_min_units === null ? null : Number(row.headline_min_units),
              warningCount: Number(row.headline_warning_count ?? 0),
            },
    },
  }
}

/**
 * Analyses joined with their lab, the dataset's current project, the dataset and the newest
 * version. Analyses of soft-deleted datasets are left out: they disappear with their dataset.
 * The headline numbers are read out of the stored result in SQL (one unpacking of the result per
 * row, jsonb_to_record, instead of one per number), so a list never loads results. The newest
 * version is one backward index probe per analysis.
 */
const ANALYSIS_SELECT = `
  SELECT a.id, a.lab_id, l.name AS lab_name, d.project_id, p.name AS project_name,
         a.dataset_id, d.name AS dataset_name, a.name, a.created_by, u.name AS creator_name,
         a.created_at, a.updated_at,
         lv.version_count, lv.latest_version_no, lv.latest_status, lv.latest_progress, lv.latest_finished_at,
         lv.headline_n_obs, lv.headline_effective_n, lv.headline_design_effect,
         lv.headline_min_units, lv.headline_warning_count
    FROM analyses a
    JOIN datasets d ON d.id = a.dataset_id
    JOIN labs l ON l.id = a.lab_id
    JOIN projects p ON p.id = d.project_id
    JOIN users u ON u.id = a.created_by
    JOIN LATERAL (
      SELECT lv.version_no AS latest_version_no, lv.status AS latest_status, lv.progress AS latest_progress,
             lv.finished_at AS latest_finished_at,
             h."nObs" AS headline_n_obs, h."effectiveN" AS headline_effective_n,
             h."designEffect" AS headline_design_effect,
             (SELECT min((g->>'nUnits')::int) FROM jsonb_array_elements(h.groups) g) AS headline_min_units,
             jsonb_array_length(h.warnings) AS headline_warning_count,
             (SELECT count(*) FROM analysis_versions c WHERE c.analysis_id = a.id)::int AS version_count
        FROM analysis_versions lv
        LEFT JOIN LATERAL jsonb_to_record(lv.result)
             AS h("nObs" bigint, "effectiveN" float8, "designEffect" float8, groups jsonb, warnings jsonb) ON true
       WHERE lv.analysis_id = a.id
       ORDER BY lv.version_no DESC
       LIMIT 1) lv ON true
   WHERE d.deleted_at IS NULL`

// Prepared: the list is what signed-in people open most, and its plan costs as much as running it.
const selectAnalysis = preparedQuery<AnalysisJoinRow>('analyses.by-id', `${ANALYSIS_SELECT} AND a.id = $1`)
const selectAnalyses = preparedQuery<AnalysisJoinRow>(
  'analyses.list',
  `${ANALYSIS_SELECT}
     AND a.lab_id = ANY($1::bigint[])
     AND ($2::bigint IS NULL OR d.project_id = $2)
     AND ($3::bigint IS NULL OR a.dataset_id = $3)
   ORDER BY a.updated_at DESC, a.id DESC`,
)

export async function findAnalysis(
  id: number,
  conn: Conn = defaultConn,
): Promise<AnalysisRecord | undefined> {
  const [row] = await selectAnalysis([id], conn)
  return row ? toAnalysis(row) : undefined
}

export interface AnalysisFilter {
  labIds: number[]
  projectId?: number
  datasetId?: number
}

export async function listAnalyses(
  filter: AnalysisFilter,
  conn: Conn = defaultConn,
): Promise<AnalysisRecord[]> {
  if (!filter.labIds.length) return []
  const rows = await selectAnalyses([filter.labIds, filter.projectId ?? null, filter.datasetId ?? null], conn)
  return rows.map(toAnalysis)
}

export async function insertAnalysis(
  values: { labId: number; projectId: number; datasetId: number; name: string; createdBy: number },
  conn: Conn = defaultConn,
): Promise<number> {
  const [row] = await conn('analyses')
    .insert({
      lab_id: values.labId,
      project_id: values.projectId,
      dataset_id: values.datasetId,
      name: values.name,
      created_by: values.createdBy,
    })
    .returning('id')
  return row.id
}

export async function renameAnalysis(id: number, name: string, conn: Conn = defaultConn): Promise<void> {
  await conn('analyses').where({ id }).update({ name, updated_at: conn.fn.now() })
}

/** Locks the analysis row so two new versions cannot take the same number; returns the next number. */
export async function lockAnalysisForNewVersion(id: number, conn: Conn): Promise<number> {
  await conn('analyses').where({ id }).forUpdate().first('id')
  const row = await conn('analysis_versions')
    .where({ analysis_id: id })
    .max<{ max: number | null }>('version_no as max')
    .first()
  await conn('analyses').where({ id }).update({ updated_at: conn.fn.now() })
  return (row?.max ?? 0) + 1
}

// ---------------------------------------------------------------- versions

/** Exclusions as recorded with a version: enough to apply them again and to show them. */
export type RecordedExclusion = AppliedExclusion & Pick<Exclusion, 'rule' | 'unit'>

export interface NewAnalysisVersion {
  analysisId: number
  versionNo: number
  datasetVersionId: number
  datasetSha256: string
  settings: AnalysisSettings
  exclusions: RecordedExclusion[]
  engineVersion: string
  createdBy: number
  /** An outcome known already, stored at once instead of queuing the version: a run made directly (the demo seed). */
  finished?: { result: AnalysisResult; chart: ChartData; runMs: number | null } | { error: AnalysisRunError }
}

function finishedColumns(finished: NewAnalysisVersion['finished'], conn: Conn) {
  if (!finished) return {}
  const times = { started_at: conn.fn.now(), finished_at: conn.fn.now() }
  if ('error' in finished) {
    return {
      status: 'failed',
      progress: JSON.stringify({ stage: 'failed', fraction: 1 }),
      error: JSON.stringify(finished.error),
      ...times,
    }
  }
  return {
    status: 'done',
    progress: JSON.stringify({ stage: 'done', fraction: 1 }),
    result: JSON.stringify(finished.result),
    chart: JSON.stringify(finished.chart),
    run_ms: finished.runMs,
    ...times,
  }
}

export async function insertAnalysisVersion(
  values: NewAnalysisVersion,
  conn: Conn = defaultConn,
): Promise<number> {
  const [row] = await conn('analysis_versions')
    .insert({
      analysis_id: values.analysisId,
      version_no: values.versionNo,
      dataset_version_id: values.datasetVersionId,
      dataset_sha256: values.datasetSha256,
      settings: JSON.stringify(values.settings),
      exclusions: JSON.stringify(values.exclusions),
      engine_version: values.engineVersion,
      created_by: values.createdBy,
      ...finishedColumns(values.finished, conn),
    })
    .returning('id')
  return row.id
}

interface VersionRow {
  id: number
  analysis_id: number
  version_no: number
  dataset_version_id: number
  dataset_version_no: number
  dataset_sha256: string
  /** As stored: engine 0.1 wrote another shape (see toVersion). */
  settings: unknown
  exclusions: RecordedExclusion[]
  engine_version: string
  status: AnalysisStatus
  progress: AnalysisProgress
  error: AnalysisRunError | null
  run_ms: number | null
  created_by: number
  creator_name: string
  created_at: Date
  started_at: Date | null
  finished_at: Date | null
}

export interface AnalysisVersionRecord extends AnalysisVersionSummary {
  /** With rule and unit, so a run can apply exactly these. */
  exclusions: RecordedExclusion[]
}

function toStatus(
  row: Pick<
    VersionRow,
    | 'id'
    | 'analysis_id'
    | 'version_no'
    | 'status'
    | 'progress'
    | 'error'
    | 'run_ms'
    | 'created_at'
    | 'started_at'
    | 'finished_at'
  >,
): AnalysisVersionStatus {
  return {
    id: row.id,
    analysisId: row.analysis_id,
    versionNo: row.version_no,
    status: row.status,
    progress: row.progress,
    error: row.error,
    createdAt: iso(row.created_at),
    startedAt: isoOrNull(row.started_at),
    finishedAt: isoOrNull(row.finished_at),
    runMs: row.run_ms,
  }
}

function toVersion(row: VersionRow): AnalysisVersionRecord {
  return {
    ...toStatus(row),
    datasetVersion: {
      id: row.dataset_version_id,
      versionNo: row.dataset_version_no,
      sha256: row.dataset_sha256,
    },
    // Parsed, so settings stored by engine 0.1 read in today's shape; the stored JSON stays as it is.
    settings: AnalysisSettings.parse(row.settings),
    exclusions: row.exclusions,
    engineVersion: row.engine_version,
    createdBy: { id: row.created_by, name: row.creator_name },
  }
}

const SUMMARY_COLUMNS = [
  'v.id',
  'v.analysis_id',
  'v.version_no',
  'v.dataset_version_id',
  'dv.version_no as dataset_version_no',
  'v.dataset_sha256',
  'v.settings',
  'v.exclusions',
  'v.engine_version',
  'v.status',
  'v.progress',
  'v.error',
  'v.run_ms',
  'v.created_by',
  'u.name as creator_name',
  'v.created_at',
  'v.started_at',
  'v.finished_at',
]

const versionQuery = (conn: Conn) =>
  conn('analysis_versions as v')
    .join('dataset_versions as dv', 'dv.id', 'v.dataset_version_id')
    .join('users as u', 'u.id', 'v.created_by')

/** Newest first; without results (they can be large). */
export async function listAnalysisVersions(
  analysisId: number,
  conn: Conn = defaultConn,
): Promise<AnalysisVersionRecord[]> {
  const rows: VersionRow[] = await versionQuery(conn)
    .where('v.analysis_id', analysisId)
    .orderBy('v.version_no', 'desc')
    .select(SUMMARY_COLUMNS)
  return rows.map(toVersion)
}

export async function findAnalysisVersion(
  analysisId: number,
  versionNo: number,
  conn: Conn = defaultConn,
): Promise<AnalysisVersionRecord | undefined> {
  const row: VersionRow | undefined = await versionQuery(conn)
    .where({ 'v.analysis_id': analysisId, 'v.version_no': versionNo })
    .first(SUMMARY_COLUMNS)
  return row ? toVersion(row) : undefined
}

export async function findAnalysisVersionResult(
  versionId: number,
  conn: Conn = defaultConn,
): Promise<{ result: AnalysisResult | null; chart: ChartData | null }> {
  const row: { result: AnalysisResult | null; chart: ChartData | null } | undefined = await conn(
    'analysis_versions',
  )
    .where({ id: versionId })
    .first('result', 'chart')
  return { result: row?.result ?? null, chart: row?.chart ? readStoredChart(row.chart) : null }
}

export async function findAnalysisVersionChart(
  versionId: number,
  conn: Conn = defaultConn,
): Promise<ChartData | null> {
  const row: { chart: ChartData | null } | undefined = await conn('analysis_versions')
    .where({ id: versionId })
    .first('chart')
  return row?.chart ? readStoredChart(row.chart) : null
}

export async function findAnalysisVersionStatus(
  analysisId: number,
  versionNo: number,
  conn: Conn = defaultConn,
): Promise<AnalysisVersionStatus | undefined> {
  const row = await conn('analysis_versions')
    .where({ analysis_id: analysisId, version_no: versionNo })
    .first(
      'id',
      'analysis_id',
      'version_no',
      'status',
      'progress',
      'error',
      'run_ms',
      'created_at',
      'started_at',
      'finished_at',
    )
  return row ? toStatus(row) : undefined
}
