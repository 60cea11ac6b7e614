import { describe, expect, it } from 'vitest'
import { effectiveN } from './effective-n'

describe('effectiveN', () => {
  it('divides the number of observations by the design effect', () => {
    // Kish (1965): n_eff = N / deff.
    expect(effectiveN(1000, 12.7)).toBeCloseTo(78.7401574803, 8)
    expect(effectiveN(30, 1)).toBe(30)
  })

  it('refuses impossible input', () => {
    expect(() => effectiveN(0, 2)).toThrow(/number of observations must be positive/)
    expect(() => effectiveN(Number.NaN, 2)).toThrow(/number of observations/)
    expect(() => effectiveN(100, 0)).toThrow(/design effect must be a positive number/)
    expect(() => effectiveN(100, Infinity)).toThrow(/design effect/)
  })
})
