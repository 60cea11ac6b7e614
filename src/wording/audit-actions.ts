import { AuditAction } from '../../shared/schemas/audit'
import type { AuditEvent } from '../../shared/schemas/audit'
import type { Role } from '../../shared/schemas/auth'
import { roleWording } from './roles'

/** Plain labels for the audit log; an action without one shows its code, so nothing is hidden. */
export const auditActionLabels: Partial<Record<AuditAction, string>> = {
  'auth.signed_in': 'Signed in',
  'auth.sign_in_failed': 'Sign-in failed',
  'auth.signed_out': 'Signed out',
  'lab.created': 'Lab created',
  'invitation.created': 'Invitation sent',
  'invitation.accepted': 'Invitation accepted',
  'invitation.revoked': 'Invitation withdrawn',
  'member.role_changed': 'Role changed',
  'member.removed': 'Member removed',
  'mail.requeued': 'E-mail queued again',
  'dataset.uploaded': 'Dataset uploaded',
  'dataset.version_added': 'Dataset version added',
  'dataset.updated': 'Dataset details changed',
  'dataset.deleted': 'Dataset deleted',
  'dataset.restored': 'Dataset restored',
  'dataset.tagging_changed': 'Nesting changed',
  'dataset.exclusion_added': 'Rows excluded',
  'dataset.exclusion_withdrawn': 'Exclusion withdrawn',
  'project.created': 'Project created',
  'project.updated': 'Project changed',
  'review.requested': 'Review requested',
  'review.commented': 'Review comment',
  'review.signed_off': 'Signed off',
  'review.changes_requested': 'Changes asked for',
  'review.withdrawn': 'Review request withdrawn',
  'share_link.created': 'Read-only link created',
  'share_link.opened': 'Read-only link opened',
  'share_link.revoked': 'Read-only link withdrawn',
  'plan.created': 'Plan saved',
  'plan.updated': 'Plan renamed or moved',
  'plan.deleted': 'Plan deleted',
}

export function auditActionLabel(action: string): string {
  return auditActionLabels[action as AuditAction] ?? action
}

/** Every known action with its label, for the filter. */
export const auditActionOptions = AuditAction.options.map((value) => ({
  value,
  title: auditActionLabel(value),
}))

function roleName(value: unknown): string {
  return typeof value === 'string' && value in roleWording ? roleWording[value as Role].label : String(value)
}

function planChanges(d: Record<string, unknown>): string {
  const name = d.name as { from?: unknown; to?: unknown } | undefined
  const parts = []
  if (name) parts.push(`renamed “${String(name.from)}” → “${String(name.to)}”`)
  if (d.projectId) parts.push('moved to another project')
  return parts.join(', ') || 'saved unchanged'
}

/** One line of what changed, from the entry's details. Unknown shapes fall back to key: value pairs. */
export function auditSummary(event: Pick<AuditEvent, 'action' | 'details'>): string {
  const d = event.details
  switch (event.action) {
    case 'auth.sign_in_failed':
      return `as ${String(d.email ?? 'unknown address')}`
    case 'invitation.created':
    case 'invitation.revoked':
      return `${String(d.email)} as ${roleName(d.role)}`
    case 'invitation.accepted':
      return `${String(d.email)} joined as ${roleName(d.role)}${d.createdAccount ? ' (new account)' : ''}`
    case 'member.role_changed':
      return `${String(d.email ?? 'member')}: ${roleName(d.from)} → ${roleName(d.to)}`
    case 'member.removed':
      return `${String(d.email ?? 'member')} (was ${roleName(d.role)})`
    case 'lab.created':
      return String(d.name ?? '')
    case 'plan.created':
    case 'plan.deleted':
      return `“${String(d.name ?? '')}”`
    case 'plan.updated':
      return planChanges(d)
  }
  return Object.entries(d)
    .map(([key, value]) => `${key}: ${typeof value === 'object' ? JSON.stringify(value) : String(value)}`)
    .join(', ')
}
