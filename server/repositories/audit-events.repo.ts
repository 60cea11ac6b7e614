import { defaultConn, type Conn } from './connection'

export interface NewAuditEvent {
  actorUserId: number | null
  labId: number | null
  action: string
  subjectType: string | null
  subjectId: string | null
  details: Record<string, unknown>
  requestId: string | null
  ip: string | null
}

export interface AuditEventRecord extends NewAuditEvent {
  id: number
  at: Date
  actor: { id: number; name: string; email: string } | null
  labName: string | null
}

interface AuditRow {
  id: number
  at: Date
  actor_user_id: number | null
  actor_name: string | null
  actor_email: string | null
  lab_id: number | null
  lab_name: string | null
  action: string
  subject_type: string | null
  subject_id: string | null
  details: Record<string, unknown>
  request_id: string | null
  ip: string | null
}

export async function insertAuditEvent(event: NewAuditEvent, conn: Conn = defaultConn): Promise<number> {
  const [row]: { id: number }[] = await conn('audit_events')
    .insert({
      actor_user_id: event.actorUserId,
      lab_id: event.labId,
      action: event.action,
      subject_type: event.subjectType,
      subject_id: event.subjectId,
      details: JSON.stringify(event.details),
      request_id: event.requestId,
      ip: event.ip,
    })
    .returning('id')
  return row.id
}

export interface AuditFilter {
  labId?: number
  action?: string
  actorId?: number
  from?: Date
  to?: Date
}

function filtered(conn: Conn, filter: AuditFilter) {
  const q = conn('audit_events as e')
  if (filter.labId !== undefined) q.where('e.lab_id', filter.labId)
  if (filter.action !== undefined) q.where('e.action', filter.action)
  if (filter.actorId !== undefined) q.where('e.actor_user_id', filter.actorId)
  if (filter.from !== undefined) q.where('e.at', '>=', filter.from)
  if (filter.to !== undefined) q.where('e.at', '<=', filter.to)
  return q
}

/** Newest first, one page, with the total for the pager. */
export async function listAuditEvents(
  filter: AuditFilter,
  page: { offset: number; limit: number },
  conn: Conn = defaultConn,
): Promise<{ items: AuditEventRecord[]; total: number }> {
  const [{ total }] = await filtered(conn, filter).count<{ total: number }[]>('* as total')
  const rows: AuditRow[] = await filtered(conn, filter)
    .leftJoin('users as u', 'u.id', 'e.actor_user_id')
    .leftJoin('labs as l', 'l.id', 'e.lab_id')
    .select('e.*', 'u.name as actor_name', 'u.email as actor_email', 'l.name as lab_name')
    .orderBy([
      { column: 'e.at', order: 'desc' },
      { column: 'e.id', order: 'desc' },
    ])
    .offset(page.offset)
    .limit(page.limit)
  return {
    total: Number(total),
    items: rows.map((r) => ({
      id: r.id,
      at: r.at,
      actorUserId: r.actor_user_id,
      actor:
        r.actor_user_id !== null && r.actor_name !== null
          ? { id: r.actor_user_id, name: r.actor_name, email: r.actor_email ?? '' }
          : null,
      labId: r.lab_id,
      labName: r.lab_name,
      action: r.action,
      subjectType: r.subject_type,
      subjectId: r.subject_id,
      details: r.details,
      requestId: r.request_id,
      ip: r.ip,
    })),
  }
}
