import { describe, expect, it } from 'vitest'
import { planUnitLevel } from './plan-unit-level'

const level = (name: string) => ({
  name,
  nUnits: 4,
  minUnitSize: 1,
  meanUnitSize: 1,
  maxUnitSize: 1,
  unitSizeCv: 0,
})

describe('planUnitLevel', () => {
  it('takes the level that carries the condition, not the innermost one', () => {
    expect(
      planUnitLevel({ conditionLevel: 'mouse', levels: [level('lab'), level('mouse'), level('slice')] }),
    ).toBe('mouse')
  })

  it('takes the next level inside when the outermost level carries the condition (one arm per lab)', () => {
    expect(planUnitLevel({ conditionLevel: 'plate', levels: [level('plate'), level('well')] })).toBe('well')
    expect(planUnitLevel({ conditionLevel: 'mouse', levels: [level('mouse')] })).toBe('mouse')
  })

  it('falls back to the innermost level without a condition, and to "unit" without levels', () => {
    expect(planUnitLevel({ conditionLevel: null, levels: [level('lab'), level('mouse')] })).toBe('mouse')
    expect(planUnitLevel({ conditionLevel: null, levels: [] })).toBe('unit')
  })
})
