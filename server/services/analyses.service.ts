import { isDeepStrictEqual } from 'node:util'
import type {
  AnalysisCreate,
  AnalysisDefaults,
  AnalysisDetail,
  AnalysisListItem,
  AnalysisListQuery,
  AnalysisVersionCreate,
  AnalysisVersionDetail,
  AnalysisVersionStatus,
  AnalysisVersionSummary,
} from '../../shared/schemas/analyses'
import type { CurrentUser } from '../../shared/schemas/auth'
import { ENGINE_VERSION } from '../../shared/stats/engine-version'
import { unitsCsv, csvFilename } from '../analysis/units-csv'
import { db } from '../db'
import { ConflictError, NotFoundError, UnprocessableError } from '../errors/app-error'
import { signalRunQueued } from '../queue/run-signal'
import {
  findAnalysisVersion,
  findAnalysisVersionResult,
  findAnalysisVersionStatus,
  insertAnalysis,
  insertAnalysisVersion,
  listAnalyses,
  listAnalysisVersions,
  lockAnalysisForNewVersion,
  renameAnalysis,
  type AnalysisRecord,
  type AnalysisVersionRecord,
  type RecordedExclusion,
} from '../repositories/analyses.repo'
import type { Conn } from '../repositories/connection'
import { activeExclusions, currentTagging } from '../repositories/datasets-annotations.repo'
import { findVersion, listColumns, listVersions, type VersionRecord } from '../repositories/datasets.repo'
import { recordAudit } from './audit.service'
import { queueVersion } from './analysis-runs.service'
import { shapeFrom } from '../rows-store/read-back'
import { keptYesNoValues } from './analysis-response-checks.service'
import { checkSettingsAgainstRows } from './analysis-design-checks.service'
import {
  checkSettingsAgainstColumns,
  labelsByColumn,
  mergeSettings,
  responseKinds,
  settingsFromTagging,
} from './analysis-settings.service'
import { canWrite, readableLabIds } from '../../shared/access'
import { readable, writable } from '../access/records'

/**
 * Analyses: who may see and run them, their immutable versions, and what a finished version
 * serves. Permissions follow the dataset's lab: every member reads; scientists and PIs create,
 * run and rename; outside the caller's labs everything is 404.
 */

async function versionOf(analysisId: number, versionNo: number): Promise<AnalysisVersionRecord> {
  const version = await findAnalysisVersion(analysisId, versionNo)
  if (!version) throw new NotFoundError(`Version ${versionNo} of this analysis not found.`)
  return version
}

/** The public shape: rule and unit of recorded exclusions stay on the server. */
function publicVersion(version: AnalysisVersionRecord): AnalysisVersionSummary {
  return {
    ...version,
    exclusions: version.exclusions.map(({ id, kind, reason, matchedRows }) => ({
      id,
      kind,
      reason,
      matchedRows,
    })),
  }
}

// ---------------------------------------------------------------- dataset versions

async function readyDatasetVersion(
  datasetId: number,
  versionNo: number | undefined,
  conn: Conn = db,
): Promise<VersionRecord> {
  if (versionNo !== undefined) {
    const version = await findVersion(datasetId, versionNo, conn)
    if (!version || version.status !== 'ready')
      throw new NotFoundError(`Version ${versionNo} of this dataset not found.`)
    return version
  }
  const newest = (await listVersions(datasetId, conn)).find((v) => v.status === 'ready')
  if (!newest) throw new NotFoundError('This dataset has no finished version yet.')
  return newest
}

async function recordExclusions(datasetVersionId: number, conn: Conn): Promise<RecordedExclusion[]> {
  const active = await activeExclusions(datasetVersionId, conn)
  return active.map(({ id, kind, reason, matchedRows, rule, unit }) => ({
    id,
    kind,
    reason,
    matchedRows,
    rule,
    unit,
  }))
}

// ---------------------------------------------------------------- reading

export async function listAnalysesFor(
  user: CurrentUser,
  query: AnalysisListQuery,
): Promise<AnalysisListItem[]> {
  let labIds = readableLabIds(user)
  if (query.labId !== undefined) labIds = labIds.filter((id) => id === query.labId)
  return listAnalyses({ labIds, projectId: query.projectId, datasetId: query.datasetId })
}

export async function getAnalysisDetail(user: CurrentUser, analysisId: number): Promise<AnalysisDetail> {
  const analysis = await readable(user, 'analysis', analysisId)
  const versions = await listAnalysisVersions(analysisId)
  const run = canWrite(user, analysis.labId)
  return { ...analysis, versions: versions.map(publicVersion), permissions: { run, rename: run } }
}

export async function getAnalysisVersion(
  user: CurrentUser,
  analysisId: number,
  versionNo: number,
): Promise<AnalysisVersionDetail> {
  await readable(user, 'analysis', analysisId)
  const version = await versionOf(analysisId, versionNo)
  const { result, chart } =
    version.status === 'done' ? await findAnalysisVersionResult(version.id) : { result: null, chart: null }
  return { ...publicVersion(version), result, chart }
}

export async function getAnalysisVersionStatus(
  user: CurrentUser,
  analysisId: number,
  versionNo: number,
): Promise<AnalysisVersionStatus> {
  await readable(user, 'analysis', analysisId)
  const status = await findAnalysisVersionStatus(analysisId, versionNo)
  if (!status) throw new NotFoundError(`Version ${versionNo} of this analysis not found.`)
  return status
}

/** Settings a new analysis of a dataset version starts from, with the columns to choose from. */
export async function getAnalysisDefaults(
  user: CurrentUser,
  datasetId: number,
  datasetVersionNo: number | undefined,
): Promise<AnalysisDefaults> {
  await readable(user, 'dataset', datasetId)
  const version = await readyDatasetVersion(datasetId, datasetVersionNo)
  const { columns, tagging, kinds } = await taggingAndColumns(version)
  return {
    datasetVersion: { id: version.id, versionNo: version.versionNo },
    settings: settingsFromTagging({ tagging, columns, binaryColumns: kinds.binaryColumns }),
    columns: columns.map((c) => c.name),
    numericColumns: columns.filter((c) => c.type === 'integer' || c.type === 'numeric').map((c) => c.name),
    labelsByColumn: labelsByColumn(columns),
    ...kinds,
  }
}

/**
 * A version's columns (and its row table's shape, read from them once), tagging and what each
 * column can be as a response. A tagged text response whose profile shows more than two values may
 * hold two in the kept rows (the others excluded): its kept values make it a yes/no column.
 */
async function taggingAndColumns(version: VersionRecord) {
  const [columns, tagging] = await Promise.all([listColumns(version.id), currentTagging(version.id)])
  const shape = shapeFrom(version, columns)
  const kinds = responseKinds(columns)
  const response = columns.find((c) => c.name === tagging?.responseColumns[0])
  if (response?.type === 'text' && !kinds.binaryColumns[response.name]) {
    const values = await keptYesNoValues(version, shape, response.name)
    if (values) kinds.binaryColumns[response.name] = values
  }
  return { columns, shape, tagging, kinds }
}

export interface UnitsCsvFile {
  filename: string
  body: string
}

/**
 * A finished version the caller may read, for its exports ("the unit table", "the R export" name
 * what is asked for in the messages): 404 outside the caller's labs, 409 while it runs, 422 (the
 * engine's words) when it failed as too thin.
 */
export async function finishedVersionFor(
  user: CurrentUser,
  analysisId: number,
  versionNo: number,
  what: string,
): Promise<{ analysis: AnalysisRecord; version: AnalysisVersionRecord }> {
  const analysis = await readable(user, 'analysis', analysisId)
  const version = await versionOf(analysisId, versionNo)
  if (version.status === 'failed') {
    if (version.error?.code === 'UNPROCESSABLE')
      throw new UnprocessableError(version.error.message, version.error.details)
    throw new ConflictError(`This version failed, so it has no ${what}. Create a new version to try again.`)
  }
  if (version.status !== 'done')
    throw new ConflictError(`This version is still running; the ${what} is ready when it is done.`, {
      status: version.status,
    })
  return { analysis, version }
}

/** The unit-level table of a finished version; 409 while it runs, 422 (the engine's words) when it failed as too thin. */
export async function exportUnitsCsv(
  user: CurrentUser,
  analysisId: number,
  versionNo: number,
): Promise<UnitsCsvFile> {
  const { analysis, version } = await finishedVersionFor(user, analysisId, versionNo, 'unit table')
  const { result, chart } = await findAnalysisVersionResult(version.id)
  if (!chart) throw new ConflictError('This version has no unit table.')
  return { filename: csvFilename(analysis.name, versionNo), body: unitsCsv(chart, result) }
}

// ---------------------------------------------------------------- writing

/**
 * A new analysis of a dataset (version 1 queued at once). Settings not given come from the
 * dataset version's tagging; every column is checked against the version (400 naming it), and
 * covariates and a second factor against its kept rows (400 / 422, see checkSettingsAgainstRows).
 */
export async function createAnalysisFor(user: CurrentUser, input: AnalysisCreate): Promise<AnalysisDetail> {
  const dataset = await readable(user, 'dataset', input.datasetId)
  await writable(user, 'lab', dataset.labId, { subject: 'analysis' })
  const version = await readyDatasetVersion(dataset.id, input.datasetVersionNo)
  const { columns, shape, tagging, kinds } = await taggingAndColumns(version)
  const asked = mergeSettings(
    settingsFromTagging({ tagging, columns, binaryColumns: kinds.binaryColumns }),
    input.settings,
  )
  checkSettingsAgainstColumns(asked, columns, version.versionNo)
  const name = input.name ?? `${dataset.name} – ${asked.response}`

  const analysisId = await db.transaction(async (trx) => {
    const exclusions = await recordExclusions(version.id, trx)
    const settings = await checkSettingsAgainstRows(version, shape, asked, exclusions, trx)
    const id = await insertAnalysis(
      {
        labId: dataset.labId,
        projectId: dataset.project.id,
        datasetId: dataset.id,
        name,
        createdBy: user.id,
      },
      trx,
    )
    const versionId = await insertAnalysisVersion(
      {
        analysisId: id,
        versionNo: 1,
        datasetVersionId: version.id,
        datasetSha256: version.sha256,
        settings,
        exclusions,
        engineVersion: ENGINE_VERSION,
        createdBy: user.id,
      },
      trx,
    )
    await queueVersion(versionId, trx)
    await recordAudit(trx, {
      action: 'analysis.created',
      labId: dataset.labId,
      subjectType: 'analysis',
      subjectId: id,
      details: { name, datasetId: dataset.id, datasetVersionNo: version.versionNo },
    })
    return id
  })
  signalRunQueued()
  return getAnalysisDetail(user, analysisId)
}

/**
 * The next version of an analysis: the newest version's settings with the given changes, on the
 * same dataset version unless another is named. Asking for exactly what the newest version
 * already is (same settings, data, exclusions and engine, not failed) answers 409. Fields the
 * settings no longer have (the error bar, now a display preference) are ignored.
 */
export async function createAnalysisVersionFor(
  user: CurrentUser,
  analysisId: number,
  input: AnalysisVersionCreate,
): Promise<AnalysisVersionSummary> {
  const analysis = await writable(user, 'analysis', analysisId)
  const [newest] = await listAnalysisVersions(analysisId)
  const datasetVersion = await readyDatasetVersion(
    analysis.dataset.id,
    input.datasetVersionNo ?? newest.datasetVersion.versionNo,
  )
  const asked = mergeSettings(newest.settings, input.settings)
  const columns = await listColumns(datasetVersion.id)
  checkSettingsAgainstColumns(asked, columns, datasetVersion.versionNo)
  const shape = shapeFrom(datasetVersion, columns)

  const versionNo = await db.transaction(async (trx) => {
    const next = await lockAnalysisForNewVersion(analysisId, trx)
    const latest = (await listAnalysisVersions(analysisId, trx))[0]
    const exclusions = await recordExclusions(datasetVersion.id, trx)
    // Before the comparison: it settles what the asked settings leave open (the value counted as yes).
    const settings = await checkSettingsAgainstRows(datasetVersion, shape, asked, exclusions, trx)
    const unchanged =
      latest.datasetVersion.id === datasetVersion.id &&
      isDeepStrictEqual(latest.exclusions, exclusions) &&
      latest.engineVersion === ENGINE_VERSION &&
      isDeepStrictEqual(latest.settings, settings)
    if (unchanged && latest.status !== 'failed') {
      throw new ConflictError(
        `Nothing changed: version ${latest.versionNo} already has these settings and data.`,
        { versionNo: latest.versionNo },
      )
    }
    const versionId = await insertAnalysisVersion(
      {
        analysisId,
        versionNo: next,
        datasetVersionId: datasetVersion.id,
        datasetSha256: datasetVersion.sha256,
        settings,
        exclusions,
        engineVersion: ENGINE_VERSION,
        createdBy: user.id,
      },
      trx,
    )
    await queueVersion(versionId, trx)
    await recordAudit(trx, {
      action: 'analysis.version_created',
      labId: analysis.labId,
      subjectType: 'analysis',
      subjectId: analysisId,
      details: { versionNo: next, datasetVersionNo: datasetVersion.versionNo },
    })
    return next
  })
  signalRunQueued()
  return publicVersion(await versionOf(analysisId, versionNo))
}

export async function renameAnalysisFor(
  user: CurrentUser,
  analysisId: number,
  name: string,
): Promise<AnalysisDetail> {
  const analysis = await writable(user, 'analysis', analysisId)
  await db.transaction(async (trx) => {
    await renameAnalysis(analysisId, name, trx)
    await recordAudit(trx, {
      action: 'analysis.renamed',
      labId: analysis.labId,
      subjectType: 'analysis',
      subjectId: analysisId,
      details: { from: analysis.name, to: name },
    })
  })
  return getAnalysisDetail(user, analysisId)
}
