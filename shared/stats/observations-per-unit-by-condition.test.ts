import { describe, expect, it } from 'vitest'
import { observationsPerUnit } from './observations-per-unit'
import { observationsPerUnitByCondition } from './observations-per-unit-by-condition'

describe('observationsPerUnitByCondition', () => {
  it('counts each condition per unit and leaves out units without it', () => {
    // Hand count, common practice, no source.
    const level = { nUnits: 3, unitOfObs: Int32Array.from([0, 0, 1, 2, 2, 2]) }
    const codes = Int32Array.from([0, 1, 1, 0, 0, 1])
    expect(observationsPerUnitByCondition(level, codes, 2)).toEqual([
      [1, 2],
      [1, 1, 1],
    ])
  })

  it('agrees with counting one condition at a time', () => {
    const level = { nUnits: 4, unitOfObs: Int32Array.from([3, 0, 1, 3, 2, 0, 1, 1, 3]) }
    const codes = Int32Array.from([2, 0, 1, 2, 0, 0, 1, 2, 1])
    const byCondition = observationsPerUnitByCondition(level, codes, 3)
    for (let c = 0; c < 3; c++) expect(byCondition[c]).toEqual(observationsPerUnit(level, { codes, code: c }))
  })
})
