import { describe, expect, it } from 'vitest'
import { figureN } from './figure-n'

describe('figureN', () => {
  const level = (name: string, nUnits: number) => ({ name, nUnits, meanUnitSize: 1 }) as never
  it('counts observations and the units that carry the condition, with the outermost level', () => {
    expect(
      figureN({ nObs: 1341, conditionLevel: 'mouse', levels: [level('site', 3), level('mouse', 24)] }),
    ).toBe('n = 1,341 observations in 24 units of “mouse”, 3 of “site”')
  })
  it('takes the innermost level without a condition level, and says no more with one level', () => {
    expect(figureN({ nObs: 40, conditionLevel: null, levels: [level('mouse', 8)] })).toBe(
      'n = 40 observations in 8 units of “mouse”',
    )
  })
})
