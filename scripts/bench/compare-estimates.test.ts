import { describe, expect, it } from 'vitest'
import type { AnalysisResult } from '../../shared/schemas/analysis-result'
import { compareEstimates, largestDifference } from './compare-estimates'

/** Only the fields compareEstimates reads; numbers invented. */
const result = {
  levels: [{ name: 'lab' }, { name: 'animal' }],
  varianceComponents: [
    { level: 'lab', variance: 50 },
    { level: 'animal', variance: 25 },
    { level: 'residual', variance: 600 },
  ],
  comparisons: { mixedModel: { contrasts: [{ a: 'NW-117', b: 'vehicle', estimate: 5, se: 0.5, df: 400 }] } },
  groups: [{ condition: 'vehicle', clustered: { estimate: 120, se: 2, df: 11 } }],
} as unknown as AnalysisResult

describe('compareEstimates', () => {
  it('matches nested levels to their R path names and computes relative differences', () => {
    const rows = compareEstimates(result, {
      components: { lab: 50.5, 'lab:animal': 25, residual: 600 },
      contrasts: [{ a: 'NW-117', b: 'vehicle', estimate: 5, se: 0.5, df: 440 }],
      means: [{ condition: 'vehicle', estimate: 120, se: 2 }],
    })
    expect(rows.map((r) => r.quantity)).toEqual([
      'variance lab',
      'variance animal',
      'variance residual',
      'contrast NW-117 − vehicle',
      '  SE',
      '  Satterthwaite df',
      'mean vehicle',
      '  SE',
      '  Satterthwaite df',
    ])
    // |50 − 50.5| / (50.5 + 25 + 600) for a variance, |400 − 440| / 440 otherwise: arithmetic, no source.
    expect(rows[0].relativeDifference).toBeCloseTo(0.5 / 675.5, 12)
    expect(rows[1].relativeDifference).toBe(0)
    expect(rows[5].relativeDifference).toBeCloseTo(40 / 440, 12)
    expect(rows[8]).toMatchObject({ reference: null, relativeDifference: null })
    expect(largestDifference(rows)).toEqual({
      quantity: 'contrast NW-117 − vehicle Satterthwaite df',
      value: 40 / 440,
    })
    expect(largestDifference(rows, 'estimates')).toEqual({ quantity: 'variance lab', value: 0.5 / 675.5 })
    expect(largestDifference(rows, 'df')!.value).toBe(40 / 440)
  })
})
