import { describe, expect, it } from 'vitest'
import type { AnalysisResult } from '../../../shared/schemas/analysis-result'
import demo from '../../../shared/report/fixtures/single-lab-demo.json'
import { twoFactorResult } from '../../../shared/report/fixtures/two-factor-result'
import { resultBadges } from './badges'

// Fixture: the engine's stored result of the seeded single-lab demo (5 mice per arm, engine 0.1.0).
const result = demo.result as AnalysisResult

const detail = (r: AnalysisResult, badge: string, id: string) =>
  resultBadges(r)
    .find((b) => b.id === badge)!
    .details.find((d) => d.id === id)

describe('result badges', () => {
  const badges = resultBadges(result)
  const byId = (id: string) => badges.find((b) => b.id === id)!

  it('shows observations, units per level, design effect and effective n with their numbers', () => {
    expect(badges.map((b) => b.id)).toEqual(['observations', 'units-mouse', 'design-effect', 'effective-n'])
    expect(byId('observations').value).toBe('412')
    expect(byId('units-mouse').value).toBe('10')
    expect(detail(result, 'units-mouse', 'per-arm')?.text).toBe('per arm: 5 vehicle · 5 NW-117')
    expect(byId('design-effect').value).toBe('17.5')
    expect(byId('effective-n').value).toBe('23.5')
  })

  it('says an engine-0.1 design effect is for the mean of all observations, and the sum adds up', () => {
    expect(detail(result, 'design-effect', 'quantity')?.text).toBe('for the mean of all observations')
    // 412 observations / 17.5 = 23.5: the line shows the division the badge's number comes from.
    expect(detail(result, 'effective-n', 'quantity')?.text).toBe(
      'for the mean of all observations: 412 observations ÷ 17.5',
    )
  })

  it('labels per-arm effective n as each arm’s mean and says on hover why they do not add up', () => {
    const perArm = detail(result, 'effective-n', 'per-arm')!
    expect(perArm.text).toBe('for each arm’s mean: 12.1 vehicle · 11.4 NW-117')
    expect(perArm.explain).toContain('do not add up to the comparison’s')
  })

  it('names the comparison the headline design effect and effective n belong to (engine ≥ 0.2)', () => {
    // Invented two-factor fixture: headline "KO − WT", design effect 6.2 of 480 observations.
    expect(detail(twoFactorResult, 'design-effect', 'quantity')?.text).toBe('for KO − WT')
    expect(detail(twoFactorResult, 'effective-n', 'quantity')?.text).toBe(
      'for KO − WT: 480 observations ÷ 6.20',
    )
    expect(detail(twoFactorResult, 'effective-n', 'per-arm')?.text).toMatch(/^for each design cell’s mean: /)
    expect(detail(twoFactorResult, 'units-mouse', 'per-arm')?.text).toMatch(/^per design cell: 6 WT:vehicle/)
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

  it('explains every badge and every hover in one sentence', () => {
    for (const r of [result, twoFactorResult])
      for (const b of resultBadges(r)) {
        expect(b.explain).toMatch(/^[A-Z].*\.$/)
        for (const d of b.details) if (d.explain) expect(d.explain).toMatch(/^[A-Z][^.]*\.$/)
      }
  })
})
