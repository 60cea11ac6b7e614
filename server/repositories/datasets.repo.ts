import type {
  ColumnProfile,
  DatasetSummary,
  DatasetVersionSummary,
  NestingSuggestion,
} from '../../shared/schemas/datasets'
import { defaultConn, type Conn } from './connection'

/** A dataset row with the names the API shows next to it. */
export interface DatasetRecord extends Omit<DatasetSummary, 'latestVersion' | 'versionCount'> {
  versionCount: number
}

interface DatasetJoinRow {
  id: number
  lab_id: number
  lab_name: string
  project_id: number
  project_name: string
  name: string
  description: string
  created_by: number
  creator_name: string
  created_at: Date
  updated_at: Date
  deleted_at: Date | null
  version_count: number
}

const iso = (d: Date) => d.toISOString()

function toDataset(row: DatasetJoinRow): DatasetRecord {
  return {
    id: row.id,
    labId: row.lab_id,
    labName: row.lab_name,
    project: { id: row.project_id, name: row.project_name },
    name: row.name,
    description: row.description,
    createdBy: { id: row.created_by, name: row.creator_name },
    createdAt: iso(row.created_at),
    updatedAt: iso(row.updated_at),
    deletedAt: row.deleted_at ? iso(row.deleted_at) : null,
    versionCount: Number(row.version_count),
  }
}

function datasetQuery(conn: Conn) {
  const versionCounts = conn('dataset_versions')
    .select('dataset_id')
    .count('* as version_count')
    .groupBy('dataset_id')
    .as('vc')
  return conn('datasets as d')
    .join('labs as l', 'l.id', 'd.lab_id')
    .join('projects as p', 'p.id', 'd.project_id')
    .join('users as u', 'u.id', 'd.created_by')
    .leftJoin(versionCounts, 'vc.dataset_id', 'd.id')
    .select(
      'd.id',
      'd.lab_id',
      'l.name as lab_name',
      'd.project_id',
      'p.name as project_name',
      'd.name',
      'd.description',
      'd.created_by',
      'u.name as creator_name',
      'd.created_at',
      'd.updated_at',
      'd.deleted_at',
      conn.raw('coalesce(vc.version_count, 0)::int as version_count'),
    )
}

export async function findDataset(id: number, conn: Conn = defaultConn): Promise<DatasetRecord | undefined> {
  const row: DatasetJoinRow | undefined = await datasetQuery(conn).where('d.id', id).first()
  return row ? toDataset(row) : undefined
}

export interface DatasetFilter {
  labIds: number[] | 'all'
  projectId?: number
  deleted: boolean
}

export async function listDatasets(
  filter: DatasetFilter,
  conn: Conn = defaultConn,
): Promise<DatasetRecord[]> {
  const query = datasetQuery(conn).orderBy([
    { column: 'd.updated_at', order: 'desc' },
    { column: 'd.id', order: 'desc' },
  ])
  if (filter.labIds !== 'all') query.whereIn('d.lab_id', filter.labIds)
  if (filter.projectId !== undefined) query.where('d.project_id', filter.projectId)
  if (filter.deleted) query.whereNotNull('d.deleted_at')
  else query.whereNull('d.deleted_at')
  const rows: DatasetJoinRow[] = await query
  return rows.map(toDataset)
}

export async function insertDataset(
  values: { labId: number; projectId: number; name: string; description: string; createdBy: number },
  conn: Conn = defaultConn,
): Promise<number> {
  const [row] = await conn('datasets')
    .insert({
      lab_id: values.labId,
      project_id: values.projectId,
      name: values.name,
      description: values.description,
      created_by: values.createdBy,
    })
    .returning('id')
  return row.id
}

export async function updateDataset(
  id: number,
  changes: { name?: string; description?: string; projectId?: number },
  conn: Conn = defaultConn,
): Promise<void> {
  const row: Record<string, unknown> = { updated_at: conn.fn.now() }
  if (changes.name !== undefined) row.name = changes.name
  if (changes.description !== undefined) row.description = changes.description
  if (changes.projectId !== undefined) row.project_id = changes.projectId
  await conn('datasets').where({ id }).update(row)
}

export async function setDatasetDeleted(
  id: number,
  deletedBy: number | null,
  conn: Conn = defaultConn,
): Promise<void> {
  await conn('datasets')
    .where({ id })
    .update(
      deletedBy === null
        ? { deleted_at: null, deleted_by: null }
        : { deleted_at: conn.fn.now(), deleted_by: deletedBy },
    )
}

/** Locks the dataset row so two uploads of a new version cannot take the same number. */
export async function lockDatasetForNewVersion(id: number, conn: Conn): Promise<number> {
  await conn('datasets').where({ id }).forUpdate().first('id')
  const row = await conn('dataset_versions')
    .where({ dataset_id: id })
    .max<{ max: number | null }>('version_no as max')
    .first()
  return (row?.max ?? 0) + 1
}

// ---------------------------------------------------------------- versions

interface VersionRow {
  id: number
  dataset_id: number
  version_no: number
  original_filename: string
  byte_size: number
  sha256: string
  file_type: 'csv' | 'xlsx'
  encoding: string
  delimiter: string | null
  decimal_mark: '.' | ','
  sheet_name: string | null
  sheet_names: string[]
  header_row: number
  row_count: number
  column_count: number
  excluded_row_count: number
  status: 'processing' | 'ready' | 'failed'
  na_values: string[]
  ingest_ms: number
  created_by: number
  creator_name: string
  created_at: Date
  tagged: boolean
}

export type VersionRecord = DatasetVersionSummary

function toVersion(row: VersionRow): VersionRecord {
  return {
    id: row.id,
    datasetId: row.dataset_id,
    versionNo: row.version_no,
    originalFilename: row.original_filename,
    byteSize: Number(row.byte_size),
    sha256: row.sha256,
    fileType: row.file_type,
    encoding: row.encoding,
    delimiter: row.delimiter,
    decimalMark: row.decimal_mark,
    sheetName: row.sheet_name,
    sheetNames: row.sheet_names,
    headerRow: row.header_row,
    rowCount: Number(row.row_count),
    columnCount: row.column_count,
    excludedRowCount: Number(row.excluded_row_count),
    status: row.status,
    naValues: row.na_values,
    createdBy: { id: row.created_by, name: row.creator_name },
    createdAt: iso(row.created_at),
    ingestMs: row.ingest_ms,
    tagged: row.tagged,
  }
}

const versionQuery = (conn: Conn) =>
  conn('dataset_versions as v')
    .join('users as u', 'u.id', 'v.created_by')
    .select(
      'v.*',
      'u.name as creator_name',
      conn.raw('exists (select 1 from dataset_taggings t where t.version_id = v.id) as tagged'),
    )

export async function insertVersion(
  values: {
    datasetId: number
    versionNo: number
    originalFilename: string
    byteSize: number
    naValues: string[]
    createdBy: number
  },
  conn: Conn = defaultConn,
): Promise<number> {
  // Placeholder hash and type until ingest has read the file; the same transaction fills them in.
  const [row] = await conn('dataset_versions')
    .insert({
      dataset_id: values.datasetId,
      version_no: values.versionNo,
      original_filename: values.originalFilename,
      byte_size: values.byteSize,
      sha256: '0'.repeat(64),
      file_type: 'csv',
      encoding: 'unknown',
      decimal_mark: '.',
      status: 'processing',
      na_values: JSON.stringify(values.naValues),
      created_by: values.createdBy,
    })
    .returning('id')
  return row.id
}

export interface IngestedVersion {
  sha256: string
  byteSize: number
  fileType: 'csv' | 'xlsx'
  encoding: string
  delimiter: string | null
  decimalMark: '.' | ','
  sheetName: string | null
  sheetNames: string[]
  headerRow: number
  rowCount: number
  columnCount: number
  suggestion: NestingSuggestion
  ingestMs: number
}

export async function completeVersion(
  id: number,
  values: IngestedVersion,
  conn: Conn = defaultConn,
): Promise<void> {
  await conn('dataset_versions')
    .where({ id })
    .update({
      sha256: values.sha256,
      byte_size: values.byteSize,
      file_type: values.fileType,
      encoding: values.encoding,
      delimiter: values.delimiter,
      decimal_mark: values.decimalMark,
      sheet_name: values.sheetName,
      sheet_names: JSON.stringify(values.sheetNames),
      header_row: values.headerRow,
      row_count: values.rowCount,
      column_count: values.columnCount,
      suggestion: JSON.stringify(values.suggestion),
      ingest_ms: values.ingestMs,
      status: 'ready',
    })
}

export async function findVersion(
  datasetId: number,
  versionNo: number,
  conn: Conn = defaultConn,
): Promise<VersionRecord | undefined> {
  const row: VersionRow | undefined = await versionQuery(conn)
    .where({ 'v.dataset_id': datasetId, 'v.version_no': versionNo })
    .first()
  return row ? toVersion(row) : undefined
}

export async function findVersionById(
  id: number,
  conn: Conn = defaultConn,
): Promise<VersionRecord | undefined> {
  const row: VersionRow | undefined = await versionQuery(conn).where('v.id', id).first()
  return row ? toVersion(row) : undefined
}

export async function listVersions(datasetId: number, conn: Conn = defaultConn): Promise<VersionRecord[]> {
  const rows: VersionRow[] = await versionQuery(conn)
    .where('v.dataset_id', datasetId)
    .orderBy('v.version_no', 'desc')
  return rows.map(toVersion)
}

/** Newest version of each dataset, for list pages (one query). */
export async function latestVersions(
  datasetIds: number[],
  conn: Conn = defaultConn,
): Promise<Map<number, VersionRecord>> {
  if (!datasetIds.length) return new Map()
  const rows: VersionRow[] = await versionQuery(conn)
    .whereIn('v.dataset_id', datasetIds)
    .whereRaw(
      'v.version_no = (select max(version_no) from dataset_versions x where x.dataset_id = v.dataset_id)',
    )
  return new Map(rows.map((r) => [r.dataset_id, toVersion(r)]))
}

export async function getSuggestion(
  versionId: number,
  conn: Conn = defaultConn,
): Promise<NestingSuggestion | null> {
  const row: { suggestion: NestingSuggestion | null } | undefined = await conn('dataset_versions')
    .where({ id: versionId })
    .first('suggestion')
  return row?.suggestion ?? null
}

export async function setExcludedRowCount(
  versionId: number,
  count: number,
  conn: Conn = defaultConn,
): Promise<void> {
  await conn('dataset_versions').where({ id: versionId }).update({ excluded_row_count: count })
}

/** Hashes of every stored original, for the sweep of orphan files. */
export async function listVersionHashes(conn: Conn = defaultConn): Promise<Set<string>> {
  const rows: { sha256: string }[] = await conn('dataset_versions').distinct('sha256')
  return new Set(rows.map((r) => r.sha256))
}

/** Versions left 'processing' (none in normal operation: ingest commits only finished versions). */
export async function listUnfinishedVersionIds(conn: Conn = defaultConn): Promise<number[]> {
  const rows: { id: number }[] = await conn('dataset_versions').whereNot({ status: 'ready' }).select('id')
  return rows.map((r) => r.id)
}

export async function deleteVersions(ids: number[], conn: Conn = defaultConn): Promise<void> {
  if (ids.length) await conn('dataset_versions').whereIn('id', ids).delete()
}

export async function listAllVersionIds(conn: Conn = defaultConn): Promise<Set<number>> {
  const rows: { id: number }[] = await conn('dataset_versions').select('id')
  return new Set(rows.map((r) => r.id))
}

// ---------------------------------------------------------------- columns

interface ColumnRow {
  position: number
  name: string
  type: ColumnProfile['type']
  missing_count: number
  distinct_count: number
  distinct_capped: boolean
  min: number | null
  max: number | null
  mean: number | null
  sd: number | null
  sample_values: string[]
  top_values: ColumnProfile['topValues']
}

export async function insertColumns(
  versionId: number,
  profiles: ColumnProfile[],
  conn: Conn = defaultConn,
): Promise<void> {
  const rows = profiles.map((p) => ({
    version_id: versionId,
    position: p.position,
    name: p.name,
    type: p.type,
    missing_count: p.missingCount,
    distinct_count: p.distinctCount,
    distinct_capped: p.distinctCapped,
    min: p.min,
    max: p.max,
    mean: p.mean,
    sd: p.sd,
    sample_values: JSON.stringify(p.sampleValues),
    top_values: p.topValues === null ? null : JSON.stringify(p.topValues),
  }))
  // Chunks keep the statement under PostgreSQL's bind-parameter limit for very wide files.
  for (let k = 0; k < rows.length; k += 500) await conn('dataset_columns').insert(rows.slice(k, k + 500))
}

export async function listColumns(versionId: number, conn: Conn = defaultConn): Promise<ColumnProfile[]> {
  const rows: ColumnRow[] = await conn('dataset_columns').where({ version_id: versionId }).orderBy('position')
  return rows.map((r) => ({
    position: r.position,
    name: r.name,
    type: r.type,
    missingCount: Number(r.missing_count),
    distinctCount: r.distinct_count,
    distinctCapped: r.distinct_capped,
    min: r.min,
    max: r.max,
    mean: r.mean,
    sd: r.sd,
    sampleValues: r.sample_values,
    topValues: r.top_values,
  }))
}

/** Marks a dataset as changed now (the list sorts by it). */
export async function touchDataset(id: number, conn: Conn = defaultConn): Promise<void> {
  await conn('datasets').where({ id }).update({ updated_at: conn.fn.now() })
}

/** Locks a version's row until the transaction ends, so changes to its exclusions happen one at a time. */
export async function lockVersion(id: number, conn: Conn): Promise<void> {
  await conn('dataset_versions').where({ id }).forUpdate().first('id')
}

/** Takes the lock that keeps two processes from sweeping leftovers at once (until the transaction ends). */
export async function lockLeftoverSweep(conn: Conn): Promise<void> {
  await conn.raw('SELECT pg_advisory_xact_lock(hashtext(?))', ['nestwise-dataset-sweep'])
}
