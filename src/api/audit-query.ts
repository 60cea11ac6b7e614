import type { AuditAction } from '../../shared/schemas/audit'

export interface AuditFilters {
  action?: AuditAction | null
  actorId?: number | null
  labId?: number | null
  /** Inclusive bounds as instants (the view turns picked days into local midnights). */
  from?: Date | null
  to?: Date | null
  page?: number
  pageSize?: number
}

export function auditQueryString(filters: AuditFilters): string {
  const params = new URLSearchParams()
  if (filters.action) params.set('action', filters.action)
  if (filters.actorId) params.set('actorId', String(filters.actorId))
  if (filters.labId) params.set('labId', String(filters.labId))
  if (filters.from) params.set('from', filters.from.toISOString())
  if (filters.to) params.set('to', filters.to.toISOString())
  if (filters.page) params.set('page', String(filters.page))
  if (filters.pageSize) params.set('pageSize', String(filters.pageSize))
  const text = params.toString()
  return text ? `?${text}` : ''
}
