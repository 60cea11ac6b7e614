import { describe, expect, it } from 'vitest'
import type { AnalysisResult } from '../schemas/analysis-result'
import demo from './fixtures/single-lab-demo.json'
import { twoFactorResult } from './fixtures/two-factor-result'
import { comparisonRows, hasPerComparisonDesignEffect, METHOD_WEIGHTS } from './comparison-rows'

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

  it('says once per method what it weights: model, unit means, bootstrap (cell-weighted), naive', () => {
    expect(rows.map((r) => r.weights)).toEqual([
      METHOD_WEIGHTS.mixedModel,
      METHOD_WEIGHTS.unitMeans,
      METHOD_WEIGHTS.bootstrap,
      METHOD_WEIGHTS.naive,
    ])
    expect(METHOD_WEIGHTS.bootstrap).toContain('cell-weighted')
    expect(METHOD_WEIGHTS.unitMeans).toContain('every unit equally')
  })

  it('gives the weights line to the first row of a method only', () => {
    const two = comparisonRows(twoFactorResult)
    for (const prefix of ['model-', 'unit-means', 'naive']) {
      const block = two.filter((r) => r.id.startsWith(prefix))
      if (block.length === 0) continue
      expect(block.filter((r) => r.weights).length, prefix).toBe(1)
    }
  })

  it('marks only the naive test as wrong, and says why', () => {
    expect(rows.filter((r) => r.wrongBecause).map((r) => r.id)).toEqual(['naive'])
    expect(rows.at(-1)!.p).toBe('p < 0.001')
    expect(rows.at(-1)!.wrongBecause).toContain('412 observations as independent')
  })
})

describe('comparison rows of a two-factor result (engine ≥ 0.2)', () => {
  // Invented fixture (shape only): the rules checked are the table's, not the statistics.
  const rows = comparisonRows(twoFactorResult)

  it('takes each contrast’s own interval and per-comparison design effect and effective n', () => {
    const first = rows.find((r) => r.id === 'model-WT:KX-9-WT:vehicle')!
    // ci [13.4 − 16.3, 13.4 + 16.3] as stored in the fixture, not recomputed.
    expect(first.interval).toBe('[-2.90, 29.7]')
    expect(first).toMatchObject({ designEffect: '7.90', effectiveN: '30.4', p: 'p = 0.36 (Holm)' })
    expect(hasPerComparisonDesignEffect(rows)).toBe(true)
    expect(hasPerComparisonDesignEffect(comparisonRows(result))).toBe(false)
  })

  it('gives one row per term of the two-way ANOVA on unit means', () => {
    const unitRows = rows.filter((r) => r.id.startsWith('unit-means'))
    expect(unitRows.map((r) => r.what)).toEqual(['genotype', 'treatment', 'genotype × treatment'])
    expect(unitRows[0]).toMatchObject({ statistic: 'F = 8.10', df: '1, 20', p: 'p = 0.010' })
    expect(unitRows[0].method).toBe('Two-way ANOVA on unit means (24 units of “mouse”)')
  })

  it('strikes through every term of the naive linear model, with one reason under the block', () => {
    const naive = rows.filter((r) => r.id.startsWith('naive'))
    expect(naive).toHaveLength(4)
    expect(naive.every((r) => r.wrongBecause?.includes('480 observations as independent'))).toBe(true)
    expect(naive.map((r) => r.reasonBelow)).toEqual([false, false, false, true])
    // The reason quotes the headline design effect (6.2 in the fixture).
    expect(naive[0].wrongBecause).toContain('design effect 6.20')
    expect(rows.at(-1)!.id).toBe('naive-soma_area_um2')
  })
})
