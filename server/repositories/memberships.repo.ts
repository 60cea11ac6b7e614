import type { Role } from '../../shared/schemas/auth'
import { defaultConn, type Conn } from './connection'

export interface UserMembership {
  userId: number
  labId: number
  labName: string
  role: Role
}

export interface LabMemberRecord {
  userId: number
  name: string
  email: string
  role: Role
}

interface MembershipJoinRow {
  user_id: number
  lab_id: number
  lab_name: string
  role: Role
}

/** Memberships of several users at once (one query for a whole user list), ordered by lab name. */
export async function listMembershipsOfUsers(
  userIds: number[],
  conn: Conn = defaultConn,
): Promise<UserMembership[]> {
  if (userIds.length === 0) return []
  const rows: MembershipJoinRow[] = await conn('memberships as m')
    .join('labs as l', 'l.id', 'm.lab_id')
    .select('m.user_id', 'm.lab_id', 'l.name as lab_name', 'm.role')
    .whereIn('m.user_id', userIds)
    .orderBy([{ column: 'l.name' }, { column: 'm.lab_id' }])
  return rows.map((r) => ({ userId: r.user_id, labId: r.lab_id, labName: r.lab_name, role: r.role }))
}

export async function listMembersOfLab(labId: number, conn: Conn = defaultConn): Promise<LabMemberRecord[]> {
  const rows: { user_id: number; name: string; email: string; role: Role }[] = await conn('memberships as m')
    .join('users as u', 'u.id', 'm.user_id')
    .select('m.user_id', 'u.name', 'u.email', 'm.role')
    .where('m.lab_id', labId)
    .whereNull('u.deleted_at')
    .orderBy([{ column: 'u.name' }, { column: 'u.id' }])
  return rows.map((r) => ({ userId: r.user_id, name: r.name, email: r.email, role: r.role }))
}

/** Adds a membership or changes the role of an existing one. */
export async function upsertMembership(
  membership: { userId: number; labId: number; role: Role },
  conn: Conn = defaultConn,
): Promise<void> {
  await conn('memberships')
    .insert({ user_id: membership.userId, lab_id: membership.labId, role: membership.role })
    .onConflict(['user_id', 'lab_id'])
    .merge(['role'])
}

export async function findMembership(
  userId: number,
  labId: number,
  conn: Conn = defaultConn,
): Promise<{ userId: number; labId: number; role: Role } | undefined> {
  const row: { user_id: number; lab_id: number; role: Role } | undefined = await conn('memberships')
    .where({ user_id: userId, lab_id: labId })
    .first()
  return row ? { userId: row.user_id, labId: row.lab_id, role: row.role } : undefined
}

/**
 * The user ids of the lab's PIs, with their rows locked until the transaction ends, so two
 * simultaneous demotions cannot both pass the "not the last PI" check.
 */
export async function lockPiMemberships(labId: number, trx: Conn): Promise<number[]> {
  const rows: { user_id: number }[] = await trx('memberships')
    .select('user_id')
    .where({ lab_id: labId, role: 'pi' })
    .forUpdate()
  return rows.map((r) => r.user_id)
}

export async function updateMembershipRole(
  userId: number,
  labId: number,
  role: Role,
  conn: Conn = defaultConn,
): Promise<void> {
  await conn('memberships').where({ user_id: userId, lab_id: labId }).update({ role })
}

export async function deleteMembership(
  userId: number,
  labId: number,
  conn: Conn = defaultConn,
): Promise<boolean> {
  return (await conn('memberships').where({ user_id: userId, lab_id: labId }).delete()) === 1
}
