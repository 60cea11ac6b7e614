import { describe, expect, it } from 'vitest'
import type { AnalysisResult } from '../../../shared/schemas/analysis-result'
import demo from '../../../shared/report/fixtures/single-lab-demo.json'
import { comparisonRows } from './comparison-rows'

// Fixture: the engine's stored result of the seeded single-lab demo; wording rules are the
// product's number style (common practice, no source).
const result = demo.result as AnalysisResult

describe('comparison rows', () => {
  const rows = comparisonRows(result)

  it('orders model, unit means, bootstrap, then the naive test', () => {
    expect(rows.map((r) => r.id)).toEqual([
      'model-NW-117-vehicle',
      'unit-means',
      'bootstrap-NW-117-vehicle',
      'naive',
    ])
  })

  it('gives the model contrast with Satterthwaite df to one decimal', () => {
    expect(rows[0]).toMatchObject({ what: 'NW-117 − vehicle', estimate: '7.62', df: '8.1', p: 'p = 0.56' })
    // R: 7.619431734895755 + c(-1, 1) * qt(0.975, 8.056916622693118) * 12.459186086713249 → -21.08, 36.32
    expect(rows[0].interval).toBe('[-21.1, 36.3]')
  })

  it('marks only the naive test as wrong, and says why', () => {
    expect(rows.filter((r) => r.wrongBecause).map((r) => r.id)).toEqual(['naive'])
    expect(rows.at(-1)!.p).toBe('p < 0.001')
    expect(rows.at(-1)!.wrongBecause).toContain('412 observations as independent')
  })
})
