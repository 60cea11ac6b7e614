import type { AuditAction, AuditEvent, AuditPage, AuditQuery } from '../../shared/schemas/audit'
import { currentRequestFacts } from '../middleware/audit-context'
import { insertAuditEvent, listAuditEvents, type AuditEventRecord } from '../repositories/audit-events.repo'
import type { Conn } from '../repositories/connection'
import { findLabById } from '../repositories/labs.repo'
import { NotFoundError } from '../errors/app-error'

export interface AuditEventInput {
  action: AuditAction
  /** Defaults to the signed-in user of the current request; null for anonymous actions. */
  actorUserId?: number | null
  labId?: number | null
  subjectType?: string | null
  subjectId?: string | number | null
  /** Small facts worth keeping (old and new role, e-mail address); never secrets or tokens. */
  details?: Record<string, unknown>
}

/**
 * Appends one entry to the audit log. Pass the transaction that makes the change, so the entry
 * exists exactly when the change does. Request id, client address and (by default) the actor come
 * from the request being handled (middleware/audit-context).
 */
export async function recordAudit(trx: Conn, event: AuditEventInput): Promise<void> {
  const facts = currentRequestFacts()
  await insertAuditEvent(
    {
      actorUserId: event.actorUserId === undefined ? facts.userId : event.actorUserId,
      labId: event.labId ?? null,
      action: event.action,
      subjectType: event.subjectType ?? null,
      subjectId: event.subjectId === undefined || event.subjectId === null ? null : String(event.subjectId),
      details: event.details ?? {},
      requestId: facts.requestId,
      ip: facts.ip,
    },
    trx,
  )
}

function toAuditEvent(record: AuditEventRecord): AuditEvent {
  return {
    id: record.id,
    at: record.at.toISOString(),
    actor: record.actor,
    labId: record.labId,
    labName: record.labName,
    action: record.action,
    subjectType: record.subjectType,
    subjectId: record.subjectId,
    details: record.details,
    requestId: record.requestId,
    ip: record.ip,
  }
}

async function page(filter: Parameters<typeof listAuditEvents>[0], query: AuditQuery): Promise<AuditPage> {
  const { items, total } = await listAuditEvents(filter, {
    offset: (query.page - 1) * query.pageSize,
    limit: query.pageSize,
  })
  return { items: items.map(toAuditEvent), total, page: query.page, pageSize: query.pageSize }
}

/** One lab's entries, for its PIs (and admins). Access is checked by the route. */
export async function listLabAudit(labId: number, query: AuditQuery): Promise<AuditPage> {
  if (!(await findLabById(labId))) throw new NotFoundError('Lab not found.')
  const { action, actorId, from, to } = query
  return page({ labId, action, actorId, from, to }, query)
}

/** Every entry of the instance, including sign-ins, for administrators. */
export async function listInstanceAudit(query: AuditQuery): Promise<AuditPage> {
  const { action, actorId, from, to, labId } = query
  return page({ labId, action, actorId, from, to }, query)
}
