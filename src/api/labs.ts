import type { Role } from '../../shared/schemas/auth'
import type { AuditPage } from '../../shared/schemas/audit'
import type { InvitationCreate, InvitationSummary } from '../../shared/schemas/invitations'
import type { LabMember, LabSummary } from '../../shared/schemas/labs'
import { request } from './http'
import { auditQueryString, type AuditFilters } from './audit-query'

const base = '/api/v1/labs'

/** The caller's labs; instance admins get every lab. */
export function listLabs(): Promise<LabSummary[]> {
  return request<LabSummary[]>(base)
}

export function listMembers(labId: number): Promise<LabMember[]> {
  return request<LabMember[]>(`${base}/${labId}/members`)
}

export function changeMemberRole(labId: number, userId: number, role: Role): Promise<LabMember> {
  return request<LabMember>(`${base}/${labId}/members/${userId}`, { method: 'PATCH', body: { role } })
}

export function removeMember(labId: number, userId: number): Promise<void> {
  return request<void>(`${base}/${labId}/members/${userId}`, { method: 'DELETE' })
}

export function listInvitations(labId: number): Promise<InvitationSummary[]> {
  return request<InvitationSummary[]>(`${base}/${labId}/invitations`)
}

export function createInvitation(labId: number, input: InvitationCreate): Promise<InvitationSummary> {
  return request<InvitationSummary>(`${base}/${labId}/invitations`, { method: 'POST', body: input })
}

export function revokeInvitation(labId: number, invitationId: number): Promise<InvitationSummary> {
  return request<InvitationSummary>(`${base}/${labId}/invitations/${invitationId}`, { method: 'DELETE' })
}

export function labAudit(labId: number, filters: AuditFilters): Promise<AuditPage> {
  return request<AuditPage>(`${base}/${labId}/audit${auditQueryString(filters)}`)
}
