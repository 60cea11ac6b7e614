import { recordAudit } from './audit.service'
import { basename, extname } from 'node:path'
import type { Knex } from 'knex'
import type { CurrentUser } from '../../shared/schemas/auth'
import type { DatasetDetail, DatasetUploadFields, DatasetVersionDetail } from '../../shared/schemas/datasets'
import { db } from '../db'
import { NotFoundError } from '../errors/app-error'
import { ingestConfig } from '../ingest/ingest-config'
import { ingestFile, type UploadedFile } from '../ingest/ingest-file'
import { originalStore } from '../originals'
import { SHA256_NAME } from '../originals/original-store'
import { sweepTempUploads } from '../uploads/temp-files'
import type { IntakeResult } from '../ingest/table-intake'
import { noProgress, type ProgressSink } from '../ingest/progress-sink'
import { logger } from '../logger'
import { currentTagging, insertTagging } from '../repositories/datasets-annotations.repo'
import {
  dropRowsTable,
  freezeRowsTable,
  indexRowsTable,
  listRowsTables,
  listUnindexedRowsTables,
} from '../rows-store/rows-tables'
import {
  completeVersion,
  deleteVersions,
  insertColumns,
  insertDataset,
  insertVersion,
  listAllVersionIds,
  listUnfinishedVersionIds,
  listVersionHashes,
  listVersions,
  lockDatasetForNewVersion,
  lockLeftoverSweep,
  touchDataset,
} from '../repositories/datasets.repo'
import { findOrInsertProject, findProject } from '../repositories/projects.repo'
import { writable } from '../access/records'
import { getDatasetDetail, getVersionDetail } from './datasets.service'
import { areYesNoLabels } from '../../shared/analysis/binary-response'

interface StoredVersion {
  versionId: number
  sha256: string
}

interface StoreVersionInput {
  datasetId: number
  versionNo: number
  userId: number
  file: UploadedFile
  /** Sheet of a workbook (name or 1-based number); the first when not given. */
  sheet?: string
  progress: ProgressSink
}

/**
 * Stores one upload as version `versionNo` of `datasetId`, inside `trx`: the version row, the rows
 * table (COPY, then frozen), column profiles, the nesting suggestion, and the original file. When
 * the previous version has a tagging whose columns all exist (responses still numeric, or text
 * with two values), it is carried over.
 */
async function storeVersion(trx: Knex.Transaction, input: StoreVersionInput): Promise<StoredVersion> {
  const { datasetId, versionNo, userId, file, progress } = input
  const started = performance.now()
  const versionId = await insertVersion(
    {
      datasetId,
      versionNo,
      originalFilename: file.originalName,
      byteSize: file.size,
      naValues: [...ingestConfig.naValues],
      createdBy: userId,
    },
    trx,
  )
  const outcome = await ingestFile(trx, versionId, file, { sheet: input.sheet, progress })
  // A live upload is only stored once the whole request arrived and was accepted.
  const byteSize = file.live ? await file.live.accepted : file.size
  progress.update({ phase: 'profiling', bytesRead: file.size, rowsStored: outcome.intake.rowCount })
  await insertColumns(versionId, outcome.intake.profiles, trx)
  await completeVersion(
    versionId,
    {
      sha256: outcome.sha256,
      byteSize,
      fileType: outcome.fileType,
      encoding: outcome.encoding,
      delimiter: outcome.delimiter,
      decimalMark: outcome.decimalMark,
      sheetName: outcome.sheetName,
      sheetNames: outcome.sheetNames,
      headerRow: outcome.intake.headerRow,
      rowCount: outcome.intake.rowCount,
      columnCount: outcome.intake.columnNames.length,
      suggestion: outcome.intake.suggestion,
      ingestMs: Math.round(performance.now() - started),
    },
    trx,
  )
  await freezeRowsTable(trx, versionId)
  if (versionNo > 1) await carryOverTagging(trx, datasetId, versionNo, versionId, outcome.intake, userId)
  // Last, so nothing after it can fail the transaction but the commit itself. An original whose
  // transaction then fails anyway is left to the start-up sweep: another process may be storing
  // a version of the same bytes right now, which a removal here could not know about.
  await originalStore().keep(file.path, outcome.sha256)
  if (outcome.fallbackReason)
    logger.info('dataset stored from parsed rows', { versionId, reason: outcome.fallbackReason })
  return { versionId, sha256: outcome.sha256 }
}

async function carryOverTagging(
  trx: Knex.Transaction,
  datasetId: number,
  versionNo: number,
  versionId: number,
  intake: IntakeResult,
  userId: number,
) {
  const previous = (await listVersions(datasetId, trx)).find((v) => v.versionNo === versionNo - 1)
  if (!previous) return
  const tagging = await currentTagging(previous.id, trx)
  if (!tagging) return
  const profiles = new Map(intake.profiles.map((p) => [p.name, p]))
  const names = [
    ...tagging.responseColumns,
    ...tagging.levels,
    ...(tagging.conditionColumn ? [tagging.conditionColumn] : []),
  ]
  if (!names.every((n) => profiles.has(n))) return
  // Responses as tagging accepts them without a look at the rows: numbers, or text with two values (yes/no).
  const stillResponse = (name: string) => {
    const p = profiles.get(name)!
    if (p.type === 'numeric' || p.type === 'integer') return true
    const labels = (p.topValues ?? []).map((t) => t.value)
    return p.type === 'text' && p.distinctCount === 2 && !p.distinctCapped && areYesNoLabels(labels)
  }
  if (!tagging.responseColumns.every(stillResponse)) return
  await insertTagging(
    {
      versionId,
      responseColumns: tagging.responseColumns,
      conditionColumn: tagging.conditionColumn,
      levels: tagging.levels,
      carriedOver: true,
      createdBy: userId,
    },
    trx,
  )
}

/** Builds the row_no index of a committed version without holding up the response. */
function indexLater(versionId: number): void {
  indexRowsTable(versionId).catch((err) =>
    logger.warn('could not index a rows table (previews stay correct, only slower)', { versionId, err }),
  )
}

function defaultName(originalName: string): string {
  const stem = basename(originalName, extname(originalName)).trim()
  return stem.slice(0, 200) || 'Untitled dataset'
}

/** A new dataset from an upload (version 1). The whole thing is one transaction: all stored or nothing. */
export async function createDatasetFromUpload(
  user: CurrentUser,
  fields: DatasetUploadFields,
  file: UploadedFile,
  progress: ProgressSink,
): Promise<DatasetDetail> {
  await writable(user, 'lab', fields.labId, { subject: 'dataset' })
  if (fields.projectId !== undefined) {
    const project = await findProject(fields.projectId)
    if (!project || project.labId !== fields.labId) throw new NotFoundError('Project not found in this lab.')
  }
  const { datasetId, versionId } = await db.transaction(async (trx) => {
    const projectId =
      fields.projectId ??
      (await findOrInsertProject({ labId: fields.labId, name: fields.projectName!, createdBy: user.id }, trx))
    const id = await insertDataset(
      {
        labId: fields.labId,
        projectId,
        name: fields.name ?? defaultName(file.originalName),
        description: fields.description,
        createdBy: user.id,
      },
      trx,
    )
    const stored = await storeVersion(trx, {
      datasetId: id,
      versionNo: 1,
      userId: user.id,
      file,
      sheet: fields.sheet,
      progress,
    })
    await recordAudit(trx, {
      actorUserId: user.id,
      labId: fields.labId,
      action: 'dataset.uploaded',
      subjectType: 'dataset',
      subjectId: id,
      details: { fileName: file.originalName },
    })
    return { datasetId: id, versionId: stored.versionId }
  })
  indexLater(versionId)
  return getDatasetDetail(user, datasetId)
}

/** A new version of an existing dataset; earlier versions stay as they are. */
export async function addVersionFromUpload(
  user: CurrentUser,
  datasetId: number,
  sheet: string | undefined,
  file: UploadedFile,
  progress: ProgressSink,
): Promise<DatasetVersionDetail> {
  const dataset = await writable(user, 'dataset', datasetId)
  const { versionNo, versionId } = await db.transaction(async (trx) => {
    const next = await lockDatasetForNewVersion(datasetId, trx)
    const stored = await storeVersion(trx, {
      datasetId,
      versionNo: next,
      userId: user.id,
      file,
      sheet,
      progress,
    })
    await touchDataset(datasetId, trx)
    await recordAudit(trx, {
      actorUserId: user.id,
      labId: dataset.labId,
      action: 'dataset.version_added',
      subjectType: 'dataset',
      subjectId: datasetId,
      details: { versionNo: next, fileName: file.originalName },
    })
    return { versionNo: next, versionId: stored.versionId }
  })
  indexLater(versionId)
  return getVersionDetail(user, datasetId, versionNo)
}

export interface SeedDatasetInput {
  labId: number
  projectName: string
  name: string
  description: string
  userId: number
  file: UploadedFile
  tagging: { responseColumns: string[]; conditionColumn: string | null; levels: string[] } | null
}

/**
 * Stores a demo dataset through the same ingest as an upload, on the connection the seed runner
 * hands in (which may not be the app's pool), tagged as given. Returns the dataset id.
 */
export async function storeSeedDataset(knex: Knex, input: SeedDatasetInput): Promise<number> {
  const { id, versionId } = await knex.transaction(async (trx) => {
    const projectId = await findOrInsertProject(
      { labId: input.labId, name: input.projectName, createdBy: input.userId },
      trx,
    )
    const id = await insertDataset(
      {
        labId: input.labId,
        projectId,
        name: input.name,
        description: input.description,
        createdBy: input.userId,
      },
      trx,
    )
    const stored = await storeVersion(trx, {
      datasetId: id,
      versionNo: 1,
      userId: input.userId,
      file: input.file,
      progress: noProgress,
    })
    if (input.tagging)
      await insertTagging(
        { versionId: stored.versionId, ...input.tagging, carriedOver: false, createdBy: input.userId },
        trx,
      )
    return { id, versionId: stored.versionId }
  })
  await indexRowsTable(versionId, knex)
  return id
}

const HOUR_MS = 60 * 60 * 1000

/**
 * Startup sweep. Ingest commits a version together with its rows table, so a crash leaves nothing
 * behind in the database; this still removes, in one transaction, any version not marked ready and
 * any rows table without a version, and builds row_no indexes a restart cut short. Upload temp
 * files of server processes that are gone (see uploads/temp-files) and stored originals no version
 * refers to (older than an hour, so uploads in flight are safe) are deleted.
 */
export async function sweepDatasetLeftovers(): Promise<{
  versions: number
  tables: number
  tempFiles: number
  originals: number
}> {
  const { versions, tables } = await db.transaction(async (trx) => {
    // Taken first so two processes starting at once do not sweep each other's work twice.
    await lockLeftoverSweep(trx)
    const unfinished = await listUnfinishedVersionIds(trx)
    for (const id of unfinished) await dropRowsTable(trx, id)
    await deleteVersions(unfinished, trx)
    const known = await listAllVersionIds(trx)
    const orphans = (await listRowsTables(trx)).filter((id) => !known.has(id))
    for (const id of orphans) await dropRowsTable(trx, id)
    return { versions: unfinished.length, tables: orphans.length }
  })
  for (const id of await listUnindexedRowsTables()) {
    await indexRowsTable(id).catch((err) =>
      logger.warn('could not index a rows table', { versionId: id, err }),
    )
  }
  const temp = await sweepTempUploads(ingestConfig.uploadsRoot)
  const store = originalStore()
  const stale = await store.staleHashes(HOUR_MS)
  // Read after the listing, so a version committed in between still protects its original. (An
  // upload that refreshes a listed copy and commits during these few statements is not covered:
  // the sweep runs once per process start, and such a coincidence only costs that one original.)
  const hashes = await listVersionHashes()
  const unreferenced = stale.filter((name) => SHA256_NAME.test(name) && !hashes.has(name))
  for (const name of unreferenced) await store.discard(name)
  return { versions, tables, tempFiles: temp.folders + temp.files, originals: unreferenced.length }
}
