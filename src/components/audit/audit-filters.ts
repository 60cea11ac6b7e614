import type { AuditAction } from '../../../shared/schemas/audit'
import type { AuditFilters } from '@/api/audit-query'

/** The filter form of the audit log page; days are "YYYY-MM-DD" from date inputs (reader's time zone). */
export interface AuditFilterForm {
  action: AuditAction | null
  actorId: number | null
  labId: number | null
  fromDay: string
  toDay: string
}

export const emptyAuditFilterForm = (): AuditFilterForm => ({
  action: null,
  actorId: null,
  labId: null,
  fromDay: '',
  toDay: '',
})

function localDay(day: string, endOfDay: boolean): Date | null {
  const match = /^(\d{4})-(\d{2})-(\d{2})$/.exec(day)
  if (!match) return null
  const [y, m, d] = match.slice(1).map(Number)
  return endOfDay ? new Date(y, m - 1, d, 23, 59, 59, 999) : new Date(y, m - 1, d, 0, 0, 0, 0)
}

/** Picked days become whole local days: "from" at its first millisecond, "to" at its last. */
export function toAuditFilters(form: AuditFilterForm, page: number, pageSize: number): AuditFilters {
  return {
    action: form.action,
    actorId: form.actorId,
    labId: form.labId,
    from: localDay(form.fromDay, false),
    to: localDay(form.toDay, true),
    page,
    pageSize,
  }
}
