import { describe, expect, it } from 'vitest'
import { observationsPerUnit } from './observations-per-unit'

describe('observationsPerUnit', () => {
  const level = { nUnits: 3, unitOfObs: Int32Array.from([0, 0, 1, 2, 2, 2]) }

  it('counts the observations of every unit', () => {
    // Hand count, common practice, no source.
    expect(observationsPerUnit(level)).toEqual([2, 1, 3])
  })

  it('counts one condition only and leaves out units without it', () => {
    const codes = Int32Array.from([0, 1, 1, 0, 0, 1])
    expect(observationsPerUnit(level, { codes, code: 0 })).toEqual([1, 2])
    expect(observationsPerUnit(level, { codes, code: 1 })).toEqual([1, 1, 1])
  })
})
