import type { RouteLocationRaw } from 'vue-router'
import { AuditAction } from '../../shared/schemas/audit'
import type { AuditEvent } from '../../shared/schemas/audit'
import type { Role } from '../../shared/schemas/auth'
import { formatDate } from '@/formatting/dates'
import { shortFingerprint } from '@/components/review/fingerprint'
import { roleWording } from './roles'

/**
 * What the audit log says about each entry: a short label ("What happened" column and filter) and
 * a sentence from the entry's details, with a link to what it is about. Every action has both:
 * the records below are typed as complete, and a test walks every action.
 */
export const auditActionLabels: Record<AuditAction, string> = {
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
  'dataset.exclusion_added': 'Rows left out',
  'dataset.exclusion_withdrawn': 'Rows taken back in',
  'project.created': 'Project created',
  'project.updated': 'Project changed',
  'analysis.created': 'Analysis created',
  'analysis.version_created': 'Analysis run again',
  'analysis.renamed': 'Analysis renamed',
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

/** A piece of a sentence: plain text, or text linking to the page of what it names. */
export type SentencePart = string | { text: string; to: RouteLocationRaw }

type Details = Record<string, unknown>
type Entry = Pick<AuditEvent, 'action' | 'details' | 'subjectId'>

const text = (value: unknown, fallback = ''): string =>
  typeof value === 'string' || typeof value === 'number' ? String(value) : fallback
const quoted = (value: unknown) => `“${text(value)}”`
const count = (n: unknown, one: string, many: string) => `${text(n, '?')} ${Number(n) === 1 ? one : many}`

function roleName(value: unknown): string {
  return typeof value === 'string' && value in roleWording ? roleWording[value as Role].label : text(value)
}

const datasetLink = (id: unknown, label = 'the dataset'): SentencePart =>
  id ? { text: label, to: { name: 'dataset', params: { datasetId: String(id) } } } : label

function analysisLink(id: unknown, versionNo?: unknown, label?: string): SentencePart {
  const words = label ?? (versionNo ? `version ${text(versionNo)} of the analysis` : 'the analysis')
  if (!id) return words
  return {
    text: words,
    to: {
      name: 'analysis',
      params: { analysisId: String(id) },
      ...(versionNo ? { query: { version: String(versionNo) } } : {}),
    },
  }
}

const planLink = (id: unknown, name: unknown): SentencePart =>
  id ? { text: quoted(name), to: { name: 'plan', params: { planId: String(id) } } } : quoted(name)

function planChanges(d: Details): string {
  const name = d.name as { from?: unknown; to?: unknown } | undefined
  const parts = []
  if (name) parts.push(`renamed it from “${text(name.from)}” to “${text(name.to)}”`)
  if (d.projectId) parts.push('moved it to another project')
  return parts.join(' and ') || 'saved it unchanged'
}

function exclusionWords(d: Details): string {
  const rows = d.matchedRows === undefined ? '' : `${count(d.matchedRows, 'row', 'rows')} `
  const kind = d.kind === 'unit' ? 'a whole unit' : 'a rule'
  return `${rows}by ${kind}${d.reason ? `, because “${text(d.reason)}”` : ''}`
}

/** The sentence of each action; the actor is named in its own column. */
const sentences: Record<AuditAction, (d: Details, subjectId: string | null) => SentencePart[]> = {
  'auth.signed_in': (d) => [d.via === 'invitation' ? 'Signed in by accepting an invitation.' : 'Signed in.'],
  'auth.sign_in_failed': (d) => [`A sign-in as ${text(d.email, 'an unknown address')} failed.`],
  'auth.signed_out': () => ['Signed out.'],
  'lab.created': (d) => [
    `Created the lab ${quoted(d.name)}${d.firstPiEmail ? ` with ${text(d.firstPiEmail)} as its first PI` : ''}.`,
  ],
  'invitation.created': (d) => [`Invited ${text(d.email)} as ${roleName(d.role)}.`],
  'invitation.accepted': (d) => [
    `Joined the lab as ${roleName(d.role)}${d.email ? ` (${text(d.email)})` : ''}${d.createdAccount ? ', with a new account' : ''}.`,
  ],
  'invitation.revoked': (d) => [`Withdrew the invitation of ${text(d.email)} as ${roleName(d.role)}.`],
  'member.role_changed': (d) => [
    `Changed the role of ${text(d.email, 'a member')} from ${roleName(d.from)} to ${roleName(d.to)}.`,
  ],
  'member.removed': (d) => [`Removed ${text(d.email, 'a member')} (${roleName(d.role)}) from the lab.`],
  'mail.requeued': (d) => [`Put the e-mail to ${text(d.to, 'someone')} back in the queue to be sent again.`],
  'dataset.uploaded': (d, id) => [
    'Uploaded ',
    datasetLink(id, d.fileName ? quoted(d.fileName) : 'a table'),
    ' as a new dataset.',
  ],
  'dataset.version_added': (d, id) => [
    `Added version ${text(d.versionNo, '?')}${d.fileName ? ` (${quoted(d.fileName)})` : ''} to `,
    datasetLink(id),
    '.',
  ],
  'dataset.updated': (_d, id) => ['Changed the name, description or project of ', datasetLink(id), '.'],
  'dataset.deleted': (_d, id) => ['Deleted ', datasetLink(id), '; an admin can restore it.'],
  'dataset.restored': (_d, id) => ['Restored ', datasetLink(id), '.'],
  'dataset.tagging_changed': (d, id) => [
    `Saved the nesting of version ${text(d.versionNo, '?')} of `,
    datasetLink(id),
    Array.isArray(d.levels) && d.levels.length ? `: ${d.levels.map((l) => text(l)).join(' › ')}.` : '.',
  ],
  'dataset.exclusion_added': (d, id) => [
    `Left out ${exclusionWords(d)} in version ${text(d.versionNo, '?')} of `,
    datasetLink(id),
    '.',
  ],
  'dataset.exclusion_withdrawn': (d, id) => [
    `Took rows left out earlier back into version ${text(d.versionNo, '?')} of `,
    datasetLink(id),
    '.',
  ],
  'project.created': (d) => [`Created the project ${quoted(d.name)}.`],
  'project.updated': (d) => [`Changed the project ${quoted(d.name)}.`],
  'analysis.created': (d, id) => [
    'Created ',
    analysisLink(id, undefined, d.name ? `the analysis ${quoted(d.name)}` : 'an analysis'),
    d.datasetVersionNo ? ` of dataset version ${text(d.datasetVersionNo)}.` : '.',
  ],
  'analysis.version_created': (d, id) => [
    'Ran ',
    analysisLink(id, d.versionNo),
    d.datasetVersionNo ? ` on dataset version ${text(d.datasetVersionNo)}.` : '.',
  ],
  'analysis.renamed': (d, id) => [
    'Renamed ',
    analysisLink(id),
    ` from ${quoted(d.from)} to ${quoted(d.to)}.`,
  ],
  'review.requested': (d) => ['Asked for a review of ', analysisLink(d.analysisId, d.versionNo), '.'],
  'review.commented': (d) => [
    d.parentId ? 'Replied to a comment on ' : 'Commented on ',
    analysisLink(d.analysisId, d.versionNo),
    '.',
  ],
  'review.signed_off': (d) => [
    'Signed off ',
    analysisLink(d.analysisId, d.versionNo),
    typeof d.hash === 'string' ? ` (fingerprint ${shortFingerprint(d.hash)}…).` : '.',
  ],
  'review.changes_requested': (d) => ['Asked for changes to ', analysisLink(d.analysisId, d.versionNo), '.'],
  'review.withdrawn': (d) => [
    'Withdrew the review request for ',
    analysisLink(d.analysisId, d.versionNo),
    '.',
  ],
  'share_link.created': (d) => [
    'Created a read-only link to ',
    analysisLink(d.analysisId, d.versionNo),
    typeof d.expiresAt === 'string' ? `, working until ${formatDate(d.expiresAt)}` : '',
    d.allowUnitTable ? ', with the unit table' : '',
    d.mailedTo ? `, e-mailed to ${text(d.mailedTo)}` : '',
    '.',
  ],
  'share_link.opened': (d) => [
    'Someone opened a read-only link to ',
    analysisLink(d.analysisId, d.versionNo),
    '.',
  ],
  'share_link.revoked': (d) => [
    'Withdrew a read-only link to ',
    analysisLink(d.analysisId, d.versionNo),
    '.',
  ],
  'plan.created': (d, id) => [
    'Saved the plan ',
    planLink(id, d.name),
    d.analysisId ? ' from ' : '.',
    ...(d.analysisId ? [analysisLink(d.analysisId, d.versionNo), '.'] : []),
  ],
  'plan.updated': (d, id) => {
    const renamedTo = (d.name as { to?: unknown } | undefined)?.to
    const plan: SentencePart = renamedTo
      ? planLink(id, renamedTo)
      : id
        ? { text: 'a plan', to: { name: 'plan', params: { planId: String(id) } } }
        : 'a plan'
    return ['Changed ', plan, `: ${planChanges(d)}.`]
  },
  'plan.deleted': (d) => [`Deleted the plan ${quoted(d.name)}.`],
}

/**
 * The entry as a sentence with links. An action this version of the app does not know yet (from
 * a newer server) is said by its code, so nothing is hidden.
 */
export function auditSentence(event: Entry): SentencePart[] {
  const sentence = sentences[event.action as AuditAction]
  return sentence ? sentence(event.details ?? {}, event.subjectId ?? null) : [`${event.action}.`]
}

/** The sentence as plain text (filters, tests, screen readers). */
export function auditSummary(event: Entry): string {
  return auditSentence(event)
    .map((part) => (typeof part === 'string' ? part : part.text))
    .join('')
}
