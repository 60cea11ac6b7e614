import type { Role } from '../../shared/schemas/auth'
import { defaultConn, type Conn } from './connection'

export interface Lab {
  id: number
  name: string
  slug: string
  createdAt: Date
}

export interface LabWithMembership extends Lab {
  memberCount: number
  /** The asking user's role; null when they are not a member. */
  myRole: Role | null
}

interface LabRow {
  id: number
  name: string
  slug: string
  created_at: Date
}

function toLab(row: LabRow): Lab {
  return { id: row.id, name: row.name, slug: row.slug, createdAt: row.created_at }
}

function labsWithCounts(conn: Conn, userId: number) {
  const counts = conn('memberships')
    .select('lab_id')
    .count<{ lab_id: number; member_count: number }[]>('* as member_count')
    .groupBy('lab_id')
    .as('c')
  return conn('labs as l')
    .select(
      'l.id',
      'l.name',
      'l.slug',
      'l.created_at',
      conn.raw('coalesce(c.member_count, 0)::int as member_count'),
      'mine.role as my_role',
    )
    .leftJoin(counts, 'c.lab_id', 'l.id')
    .leftJoin('memberships as mine', (join) => {
      join.on('mine.lab_id', '=', 'l.id').andOn('mine.user_id', '=', conn.raw('?', [userId]))
    })
    .orderBy('l.name')
}

type LabCountRow = LabRow & { member_count: number; my_role: Role | null }

function toLabWithMembership(row: LabCountRow): LabWithMembership {
  return { ...toLab(row), memberCount: row.member_count, myRole: row.my_role }
}

/** Every lab, with the given user's role where they have one (for instance administrators). */
export async function listAllLabs(userId: number, conn: Conn = defaultConn): Promise<LabWithMembership[]> {
  const rows: LabCountRow[] = await labsWithCounts(conn, userId)
  return rows.map(toLabWithMembership)
}

export async function listLabsOfUser(userId: number, conn: Conn = defaultConn): Promise<LabWithMembership[]> {
  const rows: LabCountRow[] = await labsWithCounts(conn, userId).whereNotNull('mine.role')
  return rows.map(toLabWithMembership)
}

export async function findLabById(id: number, conn: Conn = defaultConn): Promise<Lab | undefined> {
  const row: LabRow | undefined = await conn('labs').where({ id }).first()
  return row ? toLab(row) : undefined
}

export async function insertLab(lab: { name: string; slug: string }, conn: Conn = defaultConn): Promise<Lab> {
  const [row]: LabRow[] = await conn('labs').insert(lab).returning(['id', 'name', 'slug', 'created_at'])
  return toLab(row)
}

export async function findLabByNameOrSlug(
  name: string,
  slug: string,
  conn: Conn = defaultConn,
): Promise<Lab | undefined> {
  const row: LabRow | undefined = await conn('labs')
    .whereRaw('lower(name) = lower(?)', [name])
    .orWhere({ slug })
    .first()
  return row ? toLab(row) : undefined
}

export async function slugsStartingWith(prefix: string, conn: Conn = defaultConn): Promise<string[]> {
  const rows: { slug: string }[] = await conn('labs').select('slug').where('slug', 'like', `${prefix}%`)
  return rows.map((r) => r.slug)
}
