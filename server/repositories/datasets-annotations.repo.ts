import type { Exclusion, ExclusionRule, ExclusionUnit, Tagging } from '../../shared/schemas/datasets'
import { defaultConn, type Conn } from './connection'

const iso = (d: Date) => d.toISOString()

// ---------------------------------------------------------------- tagging (append-only history)

interface TaggingRow {
  id: number
  version_id: number
  response_columns: string[]
  condition_column: string | null
  levels: string[]
  carried_over: boolean
  created_by: number
  creator_name: string
  created_at: Date
}

function toTagging(row: TaggingRow): Tagging {
  return {
    id: row.id,
    versionId: row.version_id,
    responseColumns: row.response_columns,
    conditionColumn: row.condition_column,
    levels: row.levels,
    createdBy: { id: row.created_by, name: row.creator_name },
    createdAt: iso(row.created_at),
    carriedOver: row.carried_over,
  }
}

const taggingQuery = (conn: Conn) =>
  conn('dataset_taggings as t')
    .join('users as u', 'u.id', 't.created_by')
    .select('t.*', 'u.name as creator_name')

export async function insertTagging(
  values: {
    versionId: number
    responseColumns: string[]
    conditionColumn: string | null
    levels: string[]
    carriedOver: boolean
    createdBy: number
  },
  conn: Conn = defaultConn,
): Promise<number> {
  const [row] = await conn('dataset_taggings')
    .insert({
      version_id: values.versionId,
      response_columns: JSON.stringify(values.responseColumns),
      condition_column: values.conditionColumn,
      levels: JSON.stringify(values.levels),
      carried_over: values.carriedOver,
      created_by: values.createdBy,
    })
    .returning('id')
  return row.id
}

export async function currentTagging(versionId: number, conn: Conn = defaultConn): Promise<Tagging | null> {
  const row: TaggingRow | undefined = await taggingQuery(conn)
    .where('t.version_id', versionId)
    .orderBy('t.id', 'desc')
    .first()
  return row ? toTagging(row) : null
}

export async function taggingHistory(versionId: number, conn: Conn = defaultConn): Promise<Tagging[]> {
  const rows: TaggingRow[] = await taggingQuery(conn).where('t.version_id', versionId).orderBy('t.id', 'desc')
  return rows.map(toTagging)
}

// ---------------------------------------------------------------- exclusions

interface ExclusionRow {
  id: number
  version_id: number
  kind: 'rule' | 'unit'
  rule: ExclusionRule | null
  unit: ExclusionUnit | null
  reason: string
  matched_rows: number
  created_by: number
  creator_name: string
  created_at: Date
  removed_at: Date | null
  removed_by: number | null
  remover_name: string | null
}

function toExclusion(row: ExclusionRow): Exclusion {
  return {
    id: row.id,
    versionId: row.version_id,
    kind: row.kind,
    rule: row.rule,
    unit: row.unit,
    reason: row.reason,
    matchedRows: Number(row.matched_rows),
    createdBy: { id: row.created_by, name: row.creator_name },
    createdAt: iso(row.created_at),
    removedAt: row.removed_at ? iso(row.removed_at) : null,
    removedBy: row.removed_by === null ? null : { id: row.removed_by, name: row.remover_name ?? '' },
  }
}

const exclusionQuery = (conn: Conn) =>
  conn('dataset_exclusions as e')
    .join('users as u', 'u.id', 'e.created_by')
    .leftJoin('users as r', 'r.id', 'e.removed_by')
    .select('e.*', 'u.name as creator_name', 'r.name as remover_name')

export async function insertExclusion(
  values: {
    versionId: number
    kind: 'rule' | 'unit'
    rule: ExclusionRule | null
    unit: ExclusionUnit | null
    reason: string
    matchedRows: number
    createdBy: number
  },
  conn: Conn = defaultConn,
): Promise<number> {
  const [row] = await conn('dataset_exclusions')
    .insert({
      version_id: values.versionId,
      kind: values.kind,
      rule: values.rule === null ? null : JSON.stringify(values.rule),
      unit: values.unit === null ? null : JSON.stringify(values.unit),
      reason: values.reason,
      matched_rows: values.matchedRows,
      created_by: values.createdBy,
    })
    .returning('id')
  return row.id
}

/** All exclusions of a version, withdrawn ones included (they stay on record), oldest first. */
export async function listExclusions(versionId: number, conn: Conn = defaultConn): Promise<Exclusion[]> {
  const rows: ExclusionRow[] = await exclusionQuery(conn).where('e.version_id', versionId).orderBy('e.id')
  return rows.map(toExclusion)
}

export async function activeExclusions(versionId: number, conn: Conn = defaultConn): Promise<Exclusion[]> {
  const rows: ExclusionRow[] = await exclusionQuery(conn)
    .where('e.version_id', versionId)
    .whereNull('e.removed_at')
    .orderBy('e.id')
  return rows.map(toExclusion)
}

export async function findExclusion(
  versionId: number,
  id: number,
  conn: Conn = defaultConn,
): Promise<Exclusion | undefined> {
  const row: ExclusionRow | undefined = await exclusionQuery(conn)
    .where({ 'e.version_id': versionId, 'e.id': id })
    .first()
  return row ? toExclusion(row) : undefined
}

export async function markExclusionRemoved(
  id: number,
  removedBy: number,
  conn: Conn = defaultConn,
): Promise<void> {
  await conn('dataset_exclusions')
    .where({ id })
    .whereNull('removed_at')
    .update({ removed_at: conn.fn.now(), removed_by: removedBy })
}
