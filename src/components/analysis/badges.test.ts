import { describe, expect, it } from 'vitest'
import type { AnalysisResult } from '../../../shared/schemas/analysis-result'
import demo from '../../../shared/report/fixtures/single-lab-demo.json'
import { resultBadges } from './badges'

// Fixture: the engine's stored result of the seeded single-lab demo (5 mice per arm).
const result = demo.result as AnalysisResult

describe('result badges', () => {
  const badges = resultBadges(result)
  const byId = (id: string) => badges.find((b) => b.id === id)!

  it('shows observations, units per level, design effect and effective n with their numbers', () => {
    expect(badges.map((b) => b.id)).toEqual(['observations', 'units-mouse', 'design-effect', 'effective-n'])
    expect(byId('observations').value).toBe('412')
    expect(byId('units-mouse').value).toBe('10')
    expect(byId('units-mouse').detail).toBe('per arm: 5 vehicle · 5 NW-117')
    expect(byId('design-effect').value).toBe('17.5')
    expect(byId('effective-n').value).toBe('23.5')
  })

  it('colours 3–5 units per arm amber, fewer red, 6+ green (common practice, no source)', () => {
    expect(byId('units-mouse').adequacy).toBe('thin')
    const two = {
      ...result,
      groups: result.groups.map((g, i) => ({ ...g, nUnits: i === 0 ? 2 : 7 })),
    }
    expect(resultBadges(two).find((b) => b.id === 'units-mouse')!.adequacy).toBe('too-few')
    const many = { ...result, groups: result.groups.map((g) => ({ ...g, nUnits: 6 })) }
    expect(resultBadges(many).find((b) => b.id === 'units-mouse')!.adequacy).toBe('adequate')
  })

  it('judges effective n by its smallest arm', () => {
    // 12.1 and 11.4 per arm in the fixture: both 6 or more.
    expect(byId('effective-n').adequacy).toBe('adequate')
    const thin = { ...result, groups: result.groups.map((g, i) => ({ ...g, effectiveN: i ? 2.7 : 12 })) }
    expect(resultBadges(thin).find((b) => b.id === 'effective-n')!.adequacy).toBe('too-few')
  })

  it('explains every badge in one sentence', () => {
    for (const b of badges) expect(b.explain).toMatch(/^[A-Z].*\.$/)
  })
})
