import { describe, expect, it } from 'vitest'
import { AuditAction } from '../../shared/schemas/audit'
import {
  auditActionLabel,
  auditActionLabels,
  auditActionOptions,
  auditSentence,
  auditSummary,
} from './audit-actions'

/** Invented details of the shape each service records (see the recordAudit calls). */
const realistic: Record<AuditAction, Record<string, unknown>> = {
  'auth.signed_in': {},
  'auth.sign_in_failed': { email: 'x@example.test' },
  'auth.signed_out': {},
  'lab.created': { name: 'Nimbus Neurite Lab', slug: 'nimbus', firstPiEmail: 'petra@example.org' },
  'invitation.created': { email: 'a@example.test', role: 'scientist' },
  'invitation.accepted': { email: 'a@example.test', role: 'biostatistician', createdAccount: true },
  'invitation.revoked': { email: 'a@example.test', role: 'pi' },
  'member.role_changed': { email: 'sami@example.org', from: 'scientist', to: 'pi' },
  'member.removed': { email: 'theo@example.org', role: 'scientist' },
  'mail.requeued': { to: 'bea@example.org', kind: 'review_requested' },
  'dataset.uploaded': { fileName: 'nimbus-outgrowth.csv' },
  'dataset.version_added': { versionNo: 2, fileName: 'nimbus-outgrowth-v2.csv' },
  'dataset.updated': {},
  'dataset.deleted': {},
  'dataset.restored': {},
  'dataset.tagging_changed': {
    versionNo: 1,
    responseColumns: ['neurite_length_um'],
    conditionColumn: 'treatment',
    levels: ['lab', 'mouse'],
  },
  'dataset.exclusion_added': {
    versionNo: 1,
    exclusionId: 4,
    kind: 'rule',
    reason: 'Overlapping cells',
    matchedRows: 5,
  },
  'dataset.exclusion_withdrawn': { versionNo: 1, exclusionId: 4 },
  'project.created': { name: 'Neurite pilot' },
  'project.updated': { name: 'Neurite pilot' },
  'analysis.created': { name: 'Neurite length', datasetId: 3, datasetVersionNo: 1 },
  'analysis.version_created': { versionNo: 2, datasetVersionNo: 1 },
  'analysis.renamed': { from: 'Neurite length', to: 'Neurite length, NW-117' },
  'review.requested': { analysisId: 7, versionNo: 2, reviewerId: 5 },
  'review.commented': { analysisId: 7, versionNo: 2, parentId: 11 },
  'review.signed_off': {
    analysisId: 7,
    versionNo: 2,
    requestId: 3,
    hash: '3f2a9c017be4d5aa0c61f0e2b7d8c9a1e2f3a4b5c6d7e8f90123456789abcdef',
  },
  'review.changes_requested': { analysisId: 7, versionNo: 2 },
  'review.withdrawn': { analysisId: 7, versionNo: 2 },
  'share_link.created': {
    analysisId: 7,
    versionNo: 2,
    expiresAt: '2027-01-02T10:00:00.000Z',
    allowUnitTable: true,
    mailedTo: 'reviewer@example.test',
  },
  'share_link.opened': { analysisId: 7, versionNo: 2 },
  'share_link.revoked': { analysisId: 7, versionNo: 2 },
  'plan.created': { name: 'Next run', projectId: 2, analysisId: 7, versionNo: 2, labs: 1, unitsPerArm: 9 },
  'plan.updated': { name: { from: 'Next run', to: 'Run B' }, projectId: { from: null, to: 4 } },
  'plan.deleted': { name: 'Run B', analysisId: 7, versionNo: 2 },
}

describe('audit wording', () => {
  it('has a label and a sentence for every action, with no raw keys, ISO timestamps or whole hashes', () => {
    for (const action of AuditAction.options) {
      expect(auditActionLabels[action], action).toBeTruthy()
      expect(auditActionLabel(action)).not.toBe(action)
      for (const details of [realistic[action], {}]) {
        const sentence = auditSummary({ action, details, subjectId: '9' })
        expect(sentence, action).toMatch(/^[A-Z].*\.$/)
        // No "key: value" dumps of the details.
        for (const key of Object.keys(details)) expect(sentence, action).not.toContain(`${key}:`)
        expect(sentence, action).not.toMatch(/\d{4}-\d{2}-\d{2}T/)
        expect(sentence, action).not.toMatch(/[0-9a-f]{20}/)
        expect(sentence, action).not.toContain('undefined')
        expect(sentence, action).not.toContain('[object')
      }
    }
    expect(auditActionOptions).toHaveLength(AuditAction.options.length)
  })

  it('says what happened in a sentence', () => {
    expect(
      auditSummary({
        action: 'member.role_changed',
        details: realistic['member.role_changed'],
        subjectId: '2',
      }),
    ).toBe('Changed the role of sami@example.org from Scientist to PI (lab head).')
    expect(
      auditSummary({ action: 'mail.requeued', details: realistic['mail.requeued'], subjectId: '1' }),
    ).toBe('Put the e-mail to bea@example.org back in the queue to be sent again.')
    expect(
      auditSummary({ action: 'analysis.renamed', details: realistic['analysis.renamed'], subjectId: '7' }),
    ).toBe('Renamed the analysis from “Neurite length” to “Neurite length, NW-117”.')
    expect(
      auditSummary({ action: 'review.signed_off', details: realistic['review.signed_off'], subjectId: '1' }),
    ).toBe('Signed off version 2 of the analysis (fingerprint 3f2a9c017be4…).')
    expect(auditSummary({ action: 'plan.updated', details: realistic['plan.updated'], subjectId: '3' })).toBe(
      'Changed “Run B”: renamed it from “Next run” to “Run B” and moved it to another project.',
    )
  })

  it('links to what the entry is about', () => {
    const version = auditSentence({
      action: 'analysis.version_created',
      details: realistic['analysis.version_created'],
      subjectId: '7',
    })
    expect(version[1]).toEqual({
      text: 'version 2 of the analysis',
      to: { name: 'analysis', params: { analysisId: '7' }, query: { version: '2' } },
    })
    const upload = auditSentence({
      action: 'dataset.uploaded',
      details: realistic['dataset.uploaded'],
      subjectId: '3',
    })
    expect(upload[1]).toEqual({
      text: '“nimbus-outgrowth.csv”',
      to: { name: 'dataset', params: { datasetId: '3' } },
    })
  })

  it('says an action it does not know by its code', () => {
    expect(auditActionLabel('something.new')).toBe('something.new')
    expect(auditSummary({ action: 'something.new', details: { a: 1 }, subjectId: null })).toBe(
      'something.new.',
    )
  })
})
