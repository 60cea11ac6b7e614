import type { Project } from '../../shared/schemas/datasets'
import { defaultConn, type Conn } from './connection'

interface ProjectRow {
  id: number
  lab_id: number
  name: string
  description: string
  dataset_count: number
  created_at: Date
  updated_at: Date
}

function toProject(row: ProjectRow): Project {
  return {
    id: row.id,
    labId: row.lab_id,
    name: row.name,
    description: row.description,
    datasetCount: Number(row.dataset_count),
    createdAt: row.created_at.toISOString(),
    updatedAt: row.updated_at.toISOString(),
  }
}

function projectQuery(conn: Conn) {
  const counts = conn('datasets')
    .whereNull('deleted_at')
    .select('project_id')
    .count('* as dataset_count')
    .groupBy('project_id')
    .as('c')
  return conn('projects as p')
    .leftJoin(counts, 'c.project_id', 'p.id')
    .select(
      'p.id',
      'p.lab_id',
      'p.name',
      'p.description',
      'p.created_at',
      'p.updated_at',
      conn.raw('coalesce(c.dataset_count, 0)::int as dataset_count'),
    )
}

export async function listProjects(labIds: number[], conn: Conn = defaultConn): Promise<Project[]> {
  if (!labIds.length) return []
  const rows: ProjectRow[] = await projectQuery(conn)
    .whereIn('p.lab_id', labIds)
    .orderBy([{ column: 'p.name' }, { column: 'p.id' }])
  return rows.map(toProject)
}

export async function findProject(id: number, conn: Conn = defaultConn): Promise<Project | undefined> {
  const row: ProjectRow | undefined = await projectQuery(conn).where('p.id', id).first()
  return row ? toProject(row) : undefined
}

export async function findProjectByName(
  labId: number,
  name: string,
  conn: Conn = defaultConn,
): Promise<Project | undefined> {
  const row: ProjectRow | undefined = await projectQuery(conn)
    .where({ 'p.lab_id': labId, 'p.name': name })
    .first()
  return row ? toProject(row) : undefined
}

export async function insertProject(
  values: { labId: number; name: string; description: string; createdBy: number },
  conn: Conn = defaultConn,
): Promise<number> {
  const [row] = await conn('projects')
    .insert({
      lab_id: values.labId,
      name: values.name,
      description: values.description,
      created_by: values.createdBy,
    })
    .returning('id')
  return row.id
}

/** Inserts the project unless one of that name exists in the lab (concurrent uploads may race here). */
export async function findOrInsertProject(
  values: { labId: number; name: string; createdBy: number },
  conn: Conn = defaultConn,
): Promise<number> {
  await conn('projects')
    .insert({ lab_id: values.labId, name: values.name, description: '', created_by: values.createdBy })
    .onConflict(['lab_id', 'name'])
    .ignore()
  const row = await conn('projects').where({ lab_id: values.labId, name: values.name }).first('id')
  return row.id
}

export async function updateProject(
  id: number,
  changes: { name?: string; description?: string },
  conn: Conn = defaultConn,
): Promise<void> {
  const row: Record<string, unknown> = { updated_at: conn.fn.now() }
  if (changes.name !== undefined) row.name = changes.name
  if (changes.description !== undefined) row.description = changes.description
  await conn('projects').where({ id }).update(row)
}
