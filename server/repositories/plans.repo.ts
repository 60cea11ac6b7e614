import { PlanInputs, PlanResult } from '../../shared/schemas/plans'
import { defaultConn, type Conn } from './connection'

/** A stored plan with the names shown beside it (permissions are the service's business). */
export interface PlanRecord {
  id: number
  labId: number
  labName: string
  project: { id: number; name: string } | null
  source: { analysisId: number; versionNo: number; analysisName: string } | null
  name: string
  inputs: PlanInputs
  result: PlanResult
  createdBy: { id: number; name: string }
  createdAt: string
  updatedAt: string
}

interface PlanRow {
  id: number
  lab_id: number
  lab_name: string
  project_id: number | null
  project_name: string | null
  analysis_id: number | null
  analysis_version_no: number | null
  analysis_name: string | null
  name: string
  inputs: unknown
  result: unknown
  created_by: number
  creator_name: string
  created_at: Date
  updated_at: Date
}

function toPlan(row: PlanRow): PlanRecord {
  return {
    id: Number(row.id),
    labId: Number(row.lab_id),
    labName: row.lab_name,
    project: row.project_id === null ? null : { id: Number(row.project_id), name: row.project_name ?? '' },
    source:
      row.analysis_id === null
        ? null
        : {
            analysisId: Number(row.analysis_id),
            versionNo: Number(row.analysis_version_no),
            analysisName: row.analysis_name ?? '',
          },
    name: row.name,
    // Parsed on the way out, never written back: a plan saved before a field existed reads with that
    // field's default (plans before the outer level read as plans for one lab).
    inputs: PlanInputs.parse(row.inputs),
    result: PlanResult.parse(row.result),
    createdBy: { id: Number(row.created_by), name: row.creator_name },
    createdAt: row.created_at.toISOString(),
    updatedAt: row.updated_at.toISOString(),
  }
}

const planQuery = (conn: Conn) =>
  conn('plans as pl')
    .join('labs as l', 'l.id', 'pl.lab_id')
    .join('users as u', 'u.id', 'pl.created_by')
    .leftJoin('projects as pr', 'pr.id', 'pl.project_id')
    .leftJoin('analysis_versions as av', 'av.id', 'pl.analysis_version_id')
    .leftJoin('analyses as a', 'a.id', 'av.analysis_id')
    .select(
      'pl.id',
      'pl.lab_id',
      'l.name as lab_name',
      'pl.project_id',
      'pr.name as project_name',
      'a.id as analysis_id',
      'av.version_no as analysis_version_no',
      'a.name as analysis_name',
      'pl.name',
      'pl.inputs',
      'pl.result',
      'pl.created_by',
      'u.name as creator_name',
      'pl.created_at',
      'pl.updated_at',
    )

export async function listPlans(
  filter: { labIds: number[]; projectId?: number; analysisId?: number; versionNo?: number },
  conn: Conn = defaultConn,
): Promise<PlanRecord[]> {
  if (!filter.labIds.length) return []
  const query = planQuery(conn).whereIn('pl.lab_id', filter.labIds)
  if (filter.projectId !== undefined) query.where('pl.project_id', filter.projectId)
  if (filter.analysisId !== undefined) query.where('a.id', filter.analysisId)
  if (filter.versionNo !== undefined) query.where('av.version_no', filter.versionNo)
  const rows: PlanRow[] = await query.orderBy([
    { column: 'pl.updated_at', order: 'desc' },
    { column: 'pl.id', order: 'desc' },
  ])
  return rows.map(toPlan)
}

/** Plans saved from one analysis version, oldest first (the order they were made in). */
export async function listPlansOfVersion(
  analysisVersionId: number,
  conn: Conn = defaultConn,
): Promise<PlanRecord[]> {
  const rows: PlanRow[] = await planQuery(conn)
    .where('pl.analysis_version_id', analysisVersionId)
    .orderBy([
      { column: 'pl.created_at', order: 'asc' },
      { column: 'pl.id', order: 'asc' },
    ])
  return rows.map(toPlan)
}

export async function findPlan(id: number, conn: Conn = defaultConn): Promise<PlanRecord | undefined> {
  const row: PlanRow | undefined = await planQuery(conn).where('pl.id', id).first()
  return row ? toPlan(row) : undefined
}

export interface NewPlan {
  labId: number
  projectId: number | null
  analysisVersionId: number | null
  name: string
  inputs: PlanInputs
  result: PlanResult
  createdBy: number
}

export async function insertPlan(plan: NewPlan, conn: Conn = defaultConn): Promise<number> {
  const [row] = await conn('plans')
    .insert({
      lab_id: plan.labId,
      project_id: plan.projectId,
      analysis_version_id: plan.analysisVersionId,
      name: plan.name,
      inputs: JSON.stringify(plan.inputs),
      result: JSON.stringify(plan.result),
      created_by: plan.createdBy,
    })
    .returning('id')
  return Number((row as { id: number }).id)
}

export async function updatePlan(
  id: number,
  changes: { name?: string; projectId?: number | null },
  conn: Conn = defaultConn,
): Promise<void> {
  const patch: Record<string, unknown> = { updated_at: conn.fn.now() }
  if (changes.name !== undefined) patch.name = changes.name
  if (changes.projectId !== undefined) patch.project_id = changes.projectId
  await conn('plans').where({ id }).update(patch)
}

export async function deletePlan(id: number, conn: Conn = defaultConn): Promise<void> {
  await conn('plans').where({ id }).delete()
}
