import type { AuditPage } from '../../shared/schemas/audit'
import type { InvitationSummary } from '../../shared/schemas/invitations'
import type { LabCreate, LabSummary } from '../../shared/schemas/labs'
import type {
  MailDelivery,
  OutboxMessage,
  OutboxPage,
  OutboxStatus,
  ReceivedMail,
  ReceivedMailPage,
} from '../../shared/schemas/mail'
import type { AdminUserListItem } from '../../shared/schemas/users'
import { request } from './http'
import { auditQueryString, type AuditFilters } from './audit-query'

const base = '/api/v1/admin'

export function listUsers(): Promise<AdminUserListItem[]> {
  return request<AdminUserListItem[]>(`${base}/users`)
}

export function createLab(
  input: LabCreate,
): Promise<{ lab: LabSummary; invitation: InvitationSummary | null }> {
  return request(`${base}/labs`, { method: 'POST', body: input })
}

export function instanceAudit(filters: AuditFilters): Promise<AuditPage> {
  return request<AuditPage>(`${base}/audit${auditQueryString(filters)}`)
}

export function mailDelivery(): Promise<MailDelivery> {
  return request<MailDelivery>(`${base}/mail/delivery`)
}

export function listOutbox(page: {
  page: number
  pageSize: number
  status?: OutboxStatus | null
}): Promise<OutboxPage> {
  const params = new URLSearchParams({ page: String(page.page), pageSize: String(page.pageSize) })
  if (page.status) params.set('status', page.status)
  return request<OutboxPage>(`${base}/mail/outbox?${params}`)
}

export function retryOutboxMessage(id: number): Promise<OutboxMessage> {
  return request<OutboxMessage>(`${base}/mail/outbox/${id}/retry`, { method: 'POST' })
}

export function listReceivedMails(page: { page: number; pageSize: number }): Promise<ReceivedMailPage> {
  return request<ReceivedMailPage>(`${base}/mail/received?page=${page.page}&pageSize=${page.pageSize}`)
}

export function getReceivedMail(id: number): Promise<ReceivedMail> {
  return request<ReceivedMail>(`${base}/mail/received/${id}`)
}
