import type { Role } from '../../shared/schemas/auth'
import { defaultConn, type Conn } from './connection'

export interface InvitationRecord {
  id: number
  labId: number
  labName: string
  email: string
  role: Role
  invitedBy: { id: number; name: string } | null
  createdAt: Date
  expiresAt: Date
  acceptedAt: Date | null
  revokedAt: Date | null
}

interface InvitationRow {
  id: number
  lab_id: number
  lab_name: string
  email: string
  role: Role
  invited_by: number | null
  inviter_name: string | null
  created_at: Date
  expires_at: Date
  accepted_at: Date | null
  revoked_at: Date | null
}

function toRecord(row: InvitationRow): InvitationRecord {
  return {
    id: row.id,
    labId: row.lab_id,
    labName: row.lab_name,
    email: row.email,
    role: row.role,
    invitedBy:
      row.invited_by !== null && row.inviter_name !== null
        ? { id: row.invited_by, name: row.inviter_name }
        : null,
    createdAt: row.created_at,
    expiresAt: row.expires_at,
    acceptedAt: row.accepted_at,
    revokedAt: row.revoked_at,
  }
}

function selectInvitations(conn: Conn) {
  return conn('invitations as i')
    .join('labs as l', 'l.id', 'i.lab_id')
    .leftJoin('users as u', 'u.id', 'i.invited_by')
    .select(
      'i.id',
      'i.lab_id',
      'l.name as lab_name',
      'i.email',
      'i.role',
      'i.invited_by',
      'u.name as inviter_name',
      'i.created_at',
      'i.expires_at',
      'i.accepted_at',
      'i.revoked_at',
    )
}

export interface NewInvitation {
  labId: number
  email: string
  role: Role
  tokenHash: string
  invitedBy: number
  expiresAt: Date
}

export async function insertInvitation(invitation: NewInvitation, conn: Conn = defaultConn): Promise<number> {
  const [row]: { id: number }[] = await conn('invitations')
    .insert({
      lab_id: invitation.labId,
      email: invitation.email.toLowerCase(),
      role: invitation.role,
      token_hash: invitation.tokenHash,
      invited_by: invitation.invitedBy,
      expires_at: invitation.expiresAt,
    })
    .returning('id')
  return row.id
}

export async function findInvitationById(
  id: number,
  conn: Conn = defaultConn,
): Promise<InvitationRecord | undefined> {
  const row: InvitationRow | undefined = await selectInvitations(conn).where('i.id', id).first()
  return row ? toRecord(row) : undefined
}

/** Locks the row (FOR UPDATE) so two simultaneous accepts cannot both use one token. */
export async function findInvitationByTokenHash(
  tokenHash: string,
  conn: Conn = defaultConn,
  { lock = false } = {},
): Promise<InvitationRecord | undefined> {
  const query = selectInvitations(conn).where('i.token_hash', tokenHash).first()
  if (lock) query.forUpdate('i')
  const row: InvitationRow | undefined = await query
  return row ? toRecord(row) : undefined
}

/** Newest first; accepted and revoked ones only from the last `closedWithinDays` days. */
export async function listInvitationsOfLab(
  labId: number,
  conn: Conn = defaultConn,
  { closedWithinDays = 30 } = {},
): Promise<InvitationRecord[]> {
  const rows: InvitationRow[] = await selectInvitations(conn)
    .where('i.lab_id', labId)
    .andWhere((q) =>
      q
        .where((open) => open.whereNull('i.accepted_at').whereNull('i.revoked_at'))
        .orWhere('i.accepted_at', '>', conn.raw(`now() - make_interval(days => ?)`, [closedWithinDays]))
        .orWhere('i.revoked_at', '>', conn.raw(`now() - make_interval(days => ?)`, [closedWithinDays])),
    )
    .orderBy([
      { column: 'i.created_at', order: 'desc' },
      { column: 'i.id', order: 'desc' },
    ])
  return rows.map(toRecord)
}

/** Revokes every unanswered invitation of this address to this lab; returns their ids. */
export async function revokeOpenInvitations(
  labId: number,
  email: string,
  revokedBy: number,
  conn: Conn = defaultConn,
): Promise<number[]> {
  const rows: { id: number }[] = await conn('invitations')
    .where({ lab_id: labId, email: email.toLowerCase() })
    .whereNull('accepted_at')
    .whereNull('revoked_at')
    .update({ revoked_at: conn.fn.now(), revoked_by: revokedBy })
    .returning('id')
  return rows.map((r) => r.id)
}

export async function markInvitationRevoked(
  id: number,
  revokedBy: number,
  conn: Conn = defaultConn,
): Promise<boolean> {
  const count = await conn('invitations')
    .where({ id })
    .whereNull('accepted_at')
    .whereNull('revoked_at')
    .update({ revoked_at: conn.fn.now(), revoked_by: revokedBy })
  return count === 1
}

export async function markInvitationAccepted(
  id: number,
  userId: number,
  conn: Conn = defaultConn,
): Promise<boolean> {
  const count = await conn('invitations')
    .where({ id })
    .whereNull('accepted_at')
    .whereNull('revoked_at')
    .update({ accepted_at: conn.fn.now(), accepted_by: userId })
  return count === 1
}
