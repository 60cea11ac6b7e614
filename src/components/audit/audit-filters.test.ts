import { describe, expect, it } from 'vitest'
import { auditQueryString } from '@/api/audit-query'
import { emptyAuditFilterForm, toAuditFilters } from './audit-filters'

describe('toAuditFilters', () => {
  it('turns picked days into the whole local day', () => {
    const filters = toAuditFilters(
      { ...emptyAuditFilterForm(), fromDay: '2026-03-01', toDay: '2026-03-02' },
      1,
      50,
    )
    expect(filters.from).toEqual(new Date(2026, 2, 1, 0, 0, 0, 0))
    expect(filters.to).toEqual(new Date(2026, 2, 2, 23, 59, 59, 999))
  })

  it('leaves out empty fields and keeps paging', () => {
    const filters = toAuditFilters({ ...emptyAuditFilterForm(), action: 'member.removed', actorId: 7 }, 3, 25)
    expect(auditQueryString(filters)).toBe('?action=member.removed&actorId=7&page=3&pageSize=25')
    expect(auditQueryString(toAuditFilters({ ...emptyAuditFilterForm(), fromDay: 'garbage' }, 1, 50))).toBe(
      '?page=1&pageSize=50',
    )
  })
})
