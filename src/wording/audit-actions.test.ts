import { describe, expect, it } from 'vitest'
import { AuditAction } from '../../shared/schemas/audit'
import { auditActionLabel, auditActionOptions, auditSummary } from './audit-actions'

describe('audit wording', () => {
  it('labels known actions in plain words and shows unknown ones as they are', () => {
    expect(auditActionLabel('member.role_changed')).toBe('Role changed')
    expect(auditActionLabel('something.new')).toBe('something.new')
    expect(auditActionOptions).toHaveLength(AuditAction.options.length)
  })

  it('summarises the common entries in one line', () => {
    expect(
      auditSummary({
        action: 'member.role_changed',
        details: { email: 'sami@example.org', from: 'scientist', to: 'pi' },
      }),
    ).toBe('sami@example.org: Scientist → PI (lab head)')
    expect(
      auditSummary({
        action: 'invitation.accepted',
        details: { email: 'a@example.test', role: 'biostatistician', createdAccount: true },
      }),
    ).toBe('a@example.test joined as Biostatistician (new account)')
    expect(auditSummary({ action: 'auth.sign_in_failed', details: { email: 'x@example.test' } })).toBe(
      'as x@example.test',
    )
  })

  it('names the plan and what a rename or move changed', () => {
    expect(auditSummary({ action: 'plan.created', details: { name: 'Next run', unitsPerArm: 9 } })).toBe(
      '“Next run”',
    )
    expect(
      auditSummary({
        action: 'plan.updated',
        details: { name: { from: 'Next run', to: 'Run B' }, projectId: { from: null, to: 4 } },
      }),
    ).toBe('renamed “Next run” → “Run B”, moved to another project')
    expect(auditSummary({ action: 'plan.updated', details: {} })).toBe('saved unchanged')
  })

  it('falls back to key: value pairs for entries it has no sentence for', () => {
    expect(
      auditSummary({ action: 'dataset.uploaded', details: { name: 'cells', rows: 40, columns: ['a'] } }),
    ).toBe('name: cells, rows: 40, columns: ["a"]')
  })
})
