import { describe, expect, it } from 'vitest'
import { EngineInputError } from './engine-input-error'
import { twoSidedTPower } from './two-sided-t-power'

describe('twoSidedTPower', () => {
  it('matches the two-sided noncentral t power computed with R pt()', () => {
    // Reference: R 4.x, tc = qt(1 − α/2, df); power = 1 − pt(tc, df, ncp) + pt(−tc, df, ncp).
    // df 19, λ 3.1980107: the wp.mrt2arm example of WebPower (0.8583253), see three-level-power.test.ts.
    const webPower = twoSidedTPower(19, 3.1980107453341566, 0.05)
    expect(webPower.power).toBeCloseTo(0.8583253, 7)
    // jStat's t quantile is good to about 3e-8 here (R: qt(0.975, 19) = 2.093024054408).
    expect(webPower.tCritical).toBeCloseTo(2.093024054408, 6)
    expect(twoSidedTPower(1, 12, 0.05).power).toBeCloseTo(0.653555996874, 7)
    expect(twoSidedTPower(3, 4.5, 0.01).power).toBeCloseTo(0.385311758256, 7)
    // The sign of λ does not matter for a two-sided test.
    expect(twoSidedTPower(3, -4.5, 0.01).power).toBe(twoSidedTPower(3, 4.5, 0.01).power)
  })

  it('gives α with no noncentrality (common practice, no source)', () => {
    expect(twoSidedTPower(7, 0, 0.05).power).toBeCloseTo(0.05, 8)
  })

  it('refuses impossible arguments', () => {
    expect(() => twoSidedTPower(0, 1, 0.05)).toThrow(/positive degrees of freedom/)
    expect(() => twoSidedTPower(3, Number.NaN, 0.05)).toThrow(/finite noncentrality/)
    expect(() => twoSidedTPower(3, 1, 1)).toThrow(EngineInputError)
  })
})
