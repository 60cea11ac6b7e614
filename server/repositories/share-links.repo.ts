import { readStoredChart, type ChartData } from '../../shared/schemas/analyses'
import type { AnalysisResult } from '../../shared/schemas/analysis-result'
import { defaultConn, type Conn } from './connection'

export interface ShareLinkRecord {
  id: number
  analysisVersionId: number
  analysisId: number
  labId: number
  versionNo: number
  allowUnitTable: boolean
  note: string
  createdBy: { id: number; name: string }
  createdAt: Date
  expiresAt: Date
  revokedAt: Date | null
  openCount: number
  lastOpenedAt: Date | null
}

interface LinkRow {
  id: number
  analysis_version_id: number
  analysis_id: number
  lab_id: number
  version_no: number
  allow_unit_table: boolean
  note: string
  created_by: number
  creator_name: string
  created_at: Date
  expires_at: Date
  revoked_at: Date | null
  open_count: number
  last_opened_at: Date | null
}

function toLink(row: LinkRow): ShareLinkRecord {
  return {
    id: row.id,
    analysisVersionId: row.analysis_version_id,
    analysisId: row.analysis_id,
    labId: row.lab_id,
    versionNo: row.version_no,
    allowUnitTable: row.allow_unit_table,
    note: row.note,
    createdBy: { id: row.created_by, name: row.creator_name },
    createdAt: row.created_at,
    expiresAt: row.expires_at,
    revokedAt: row.revoked_at,
    openCount: row.open_count,
    lastOpenedAt: row.last_opened_at,
  }
}

const linkQuery = (conn: Conn) =>
  conn('share_links as s')
    .join('analysis_versions as v', 'v.id', 's.analysis_version_id')
    .join('analyses as a', 'a.id', 'v.analysis_id')
    .join('datasets as d', 'd.id', 'a.dataset_id')
    .join('users as u', 'u.id', 's.created_by')
    .whereNull('d.deleted_at')
    .select(
      's.id',
      's.analysis_version_id',
      'v.analysis_id',
      'a.lab_id',
      'v.version_no',
      's.allow_unit_table',
      's.note',
      's.created_by',
      'u.name as creator_name',
      's.created_at',
      's.expires_at',
      's.revoked_at',
      's.open_count',
      's.last_opened_at',
    )

export async function insertShareLink(
  values: {
    analysisVersionId: number
    tokenHash: string
    allowUnitTable: boolean
    note: string
    createdBy: number
    expiresAt: Date
  },
  conn: Conn = defaultConn,
): Promise<number> {
  const [row] = await conn('share_links')
    .insert({
      analysis_version_id: values.analysisVersionId,
      token_hash: values.tokenHash,
      allow_unit_table: values.allowUnitTable,
      note: values.note,
      created_by: values.createdBy,
      expires_at: values.expiresAt,
    })
    .returning('id')
  return row.id
}

export async function findShareLink(
  id: number,
  conn: Conn = defaultConn,
): Promise<ShareLinkRecord | undefined> {
  const row: LinkRow | undefined = await linkQuery(conn).where('s.id', id).first()
  return row ? toLink(row) : undefined
}

/** A link by its token's hash, only while it is usable (not revoked, not expired, dataset not deleted). */
export async function findUsableShareLinkByHash(
  tokenHash: string,
  conn: Conn = defaultConn,
): Promise<ShareLinkRecord | undefined> {
  const row: LinkRow | undefined = await linkQuery(conn)
    .where('s.token_hash', tokenHash)
    .whereNull('s.revoked_at')
    .where('s.expires_at', '>', conn.fn.now())
    .first()
  return row ? toLink(row) : undefined
}

export async function listShareLinksOfAnalysis(
  analysisId: number,
  conn: Conn = defaultConn,
): Promise<ShareLinkRecord[]> {
  const rows: LinkRow[] = await linkQuery(conn)
    .where('v.analysis_id', analysisId)
    .orderBy([
      { column: 's.created_at', order: 'desc' },
      { column: 's.id', order: 'desc' },
    ])
  return rows.map(toLink)
}

/** Revokes a link that is still unrevoked; false when someone else did first. */
export async function markShareLinkRevoked(id: number, userId: number, conn: Conn): Promise<boolean> {
  const count = await conn('share_links')
    .where({ id })
    .whereNull('revoked_at')
    .update({ revoked_at: conn.fn.now(), revoked_by: userId })
  return count > 0
}

export async function countShareLinkOpened(id: number, conn: Conn): Promise<void> {
  await conn('share_links')
    .where({ id })
    .update({ open_count: conn.raw('open_count + 1'), last_opened_at: conn.fn.now() })
}

/** What a shared page shows: the stored result and chart, and the facts beside them, in one read. */
export async function findSharedVersionFacts(versionId: number, conn: Conn = defaultConn) {
  const row: {
    finished_at: Date | null
    engine_version: string
    dataset_sha256: string
    settings: Record<string, unknown>
    result: AnalysisResult | null
    chart: ChartData | null
  } = await conn('analysis_versions')
    .where({ id: versionId })
    .first('finished_at', 'engine_version', 'dataset_sha256', 'settings', 'result', 'chart')
  return {
    finishedAt: row.finished_at,
    engineVersion: row.engine_version,
    datasetSha256: row.dataset_sha256,
    settings: row.settings,
    result: row.result,
    chart: row.chart ? readStoredChart(row.chart) : null,
  }
}

/**
 * Counts an opening of the link by `visitor` in the current hour; true when it is the visitor's
 * first opening of that hour. Visits older than two days are forgotten on the way.
 */
export async function recordShareLinkVisit(linkId: number, visitor: string, conn: Conn): Promise<boolean> {
  await conn('share_link_visits').where('hour', '<', conn.raw("now() - interval '2 days'")).delete()
  const result = await conn.raw(
    `INSERT INTO share_link_visits (share_link_id, visitor, hour) VALUES (?, ?, date_trunc('hour', now()))
     ON CONFLICT (share_link_id, visitor, hour) DO UPDATE SET opens = share_link_visits.opens + 1
     RETURNING opens`,
    [linkId, visitor],
  )
  return (result.rows as { opens: number }[])[0].opens === 1
}
