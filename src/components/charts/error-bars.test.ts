import { describe, expect, it } from 'vitest'
import type { ConditionBars } from '../../../shared/schemas/analyses'
import { naiveBar, nestedBar } from './error-bars'

// Numbers invented for the check; bars are mean ± the chosen spread (common practice, no source).
const bars: ConditionBars = {
  condition: 'vehicle',
  nObs: 100,
  naive: { estimate: 10, se: 0.4, df: 99, ci: [9.2, 10.8], sd: 4 },
  nested: { estimate: 11, se: 2, df: 8.1, ci: [6.5, 15.5], sd: 3, nUnits: 5 },
}

describe('error bars', () => {
  it('uses mean ± SEM, ± SD or the stored CI', () => {
    expect(naiveBar(bars, 'sem')).toEqual({ mean: 10, low: 9.6, high: 10.4 })
    expect(naiveBar(bars, 'sd')).toEqual({ mean: 10, low: 6, high: 14 })
    expect(nestedBar(bars, 'ci95')).toEqual({ mean: 11, low: 6.5, high: 15.5 })
    expect(nestedBar(bars, 'sem')).toEqual({ mean: 11, low: 9, high: 13 })
  })
  it('gives no nested SD bar when the unit SD is unknown', () => {
    expect(nestedBar({ ...bars, nested: { ...bars.nested, sd: null } }, 'sd')).toBeNull()
  })
})
