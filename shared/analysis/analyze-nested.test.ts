import jStat from 'jstat'
import { describe, expect, it } from 'vitest'
import { AnalysisResult } from '../schemas/analysis-result'
import { analyzeNested } from './analyze-nested'
import { EngineInputError } from '../stats/engine-input-error'
import { dyestuff } from '../stats/fixtures/dyestuff'
import { dyestuff2 } from '../stats/fixtures/dyestuff2'
import { machines } from '../stats/fixtures/machines'
import { nestedColumnsFromTable } from '../stats/fixtures/nested-columns-from-table'
import { oxide } from '../stats/fixtures/oxide'
import { pastes } from '../stats/fixtures/pastes'

const codes = (result: AnalysisResult) => result.warnings.map((w) => w.code)

/**
 * Six invented animals, three per arm, two cells each: small enough to check by hand.
 * vehicle animals: (1, 2) (2, 2.5) (1, 3); NW-117 animals: (3, 5) (4, 3) (6, 5).
 */
const sixAnimals = {
  animal: ['v1', 'v1', 'v2', 'v2', 'v3', 'v3', 't1', 't1', 't2', 't2', 't3', 't3'],
  treatment: [
    'vehicle',
    'vehicle',
    'vehicle',
    'vehicle',
    'vehicle',
    'vehicle',
    'NW-117',
    'NW-117',
    'NW-117',
    'NW-117',
    'NW-117',
    'NW-117',
  ],
  length: [1, 2, 2, 2.5, 1, 3, 3, 5, 4, 3, 6, 5],
}

describe('analyzeNested on six animals (hand calculation, common practice, no source)', () => {
  const result = analyzeNested(nestedColumnsFromTable(sixAnimals, 'length', ['animal'], 'treatment'))
  // By hand: unit means vehicle 1.5, 2.25, 2 (mean 23/12); NW-117 4, 3.5, 5.5 (mean 13/3).
  // Within-animal SS = 0.5 + 0.125 + 2 + 2 + 0.5 + 0.5 = 5.625 on 6 df → MSW = 0.9375.
  // Pooled variance of unit means within arms = (0.2916̅ + 2.1666̅) / 4 = 0.6145833; MS(animal) = 2 × that.
  const msw = 0.9375
  const pooledUnitMeanVar = (7 / 24 + 13 / 6) / 4
  const sigmaAnimal = (2 * pooledUnitMeanVar - msw) / 2

  it('matches the result schema', () => {
    expect(() => AnalysisResult.parse(result)).not.toThrow()
  })

  it('gives the ANOVA variance components, which equal REML on balanced data when positive', () => {
    // Balanced nested ANOVA = REML when no estimate is negative: Searle, Casella & McCulloch (1992), §4.
    expect(result.varianceComponents.map((c) => c.level)).toEqual(['animal', 'residual'])
    expect(result.varianceComponents[0].variance).toBeCloseTo(sigmaAnimal, 7)
    expect(result.varianceComponents[1].variance).toBeCloseTo(msw, 7)
    const icc = sigmaAnimal / (sigmaAnimal + msw)
    expect(result.icc[0].icc).toBeCloseTo(icc, 7)
    expect(result.varianceComponents[0].share).toBeCloseTo(icc, 7)
  })

  it('computes design effect and effective n from the ICC and the unit size (Kish 1965)', () => {
    const icc = sigmaAnimal / (sigmaAnimal + msw)
    expect(result.designEffect).toBeCloseTo(1 + (2 - 1) * icc, 7)
    expect(result.designEffectKish).toBeCloseTo(result.designEffect, 12)
    expect(result.effectiveN).toBeCloseTo(12 / (1 + icc), 7)
    for (const group of result.groups) expect(group.effectiveN).toBeCloseTo(6 / (1 + icc), 7)
  })

  it('gives naive SEs and CIs from each arm’s observations (t with n − 1 df)', () => {
    const vehicle = result.groups.find((g) => g.condition === 'vehicle')!
    expect(vehicle.mean).toBeCloseTo(23 / 12, 12)
    // Sample variance of 1, 2, 2, 2.5, 1, 3 is 3.2083̅ / 5.
    const se = Math.sqrt(3.2083333333333335 / 5 / 6)
    expect(vehicle.naive.se).toBeCloseTo(se, 10)
    expect(vehicle.naive.df).toBe(5)
    expect(vehicle.naive.ciHigh - vehicle.mean).toBeCloseTo(2.570582 * se, 5) // t(0.975, 5) = 2.570582 (any t table)
    expect(vehicle.nUnits).toBe(3)
  })

  it('gives cluster-correct SEs equal to the SE of the mean of unit means (balanced, one level)', () => {
    // Var(mean) = (σ_a² + σ²/m) / k, estimated by the pooled unit-mean variance / 3 with 4 df.
    const vehicle = result.groups.find((g) => g.condition === 'vehicle')!
    expect(vehicle.clustered.estimate).toBeCloseTo(23 / 12, 8)
    expect(vehicle.clustered.se).toBeCloseTo(Math.sqrt(pooledUnitMeanVar / 3), 6)
    expect(vehicle.clustered.df).toBeCloseTo(4, 4)
  })

  it('makes the mixed-model contrast coincide with the t-test on unit means', () => {
    const se = Math.sqrt(pooledUnitMeanVar * (2 / 3))
    const t = (13 / 3 - 23 / 12) / se
    const [contrast] = result.comparisons.mixedModel!.contrasts
    expect(contrast).toMatchObject({ a: 'NW-117', b: 'vehicle' })
    expect(contrast.estimate).toBeCloseTo(13 / 3 - 23 / 12, 8)
    expect(contrast.se).toBeCloseTo(se, 6)
    expect(contrast.df).toBeCloseTo(4, 4)
    expect(contrast.t).toBeCloseTo(t, 5)
    expect(contrast.pHolm).toBe(contrast.p)
    expect(result.comparisons.mixedModel!.omnibus).toBeNull()
    const unitMeans = result.comparisons.unitMeans
    expect(unitMeans).toMatchObject({
      method: 'student-t',
      level: 'animal',
      nUnits: 6,
      a: 'NW-117',
      b: 'vehicle',
      df: 4,
    })
    if (unitMeans?.method !== 'student-t') throw new Error('expected a t-test')
    expect(unitMeans.t).toBeCloseTo(t, 10)
    expect(unitMeans.p).toBeCloseTo(contrast.p, 5)
  })

  it('adds the naive Welch test, flagged as invalid', () => {
    // Welch by hand: variances 0.641667 and 1.466667, n = 6 each.
    const va = 3.2083333333333335 / 5 / 6
    const vb = 7.333333333333333 / 5 / 6
    const naive = result.comparisons.naive
    if (naive?.method !== 'welch') throw new Error('expected Welch')
    expect(naive.estimate).toBeCloseTo(13 / 3 - 23 / 12, 12)
    expect(naive.t).toBeCloseTo((13 / 3 - 23 / 12) / Math.sqrt(va + vb), 10)
    expect(naive.df).toBeCloseTo((va + vb) ** 2 / (va ** 2 / 5 + vb ** 2 / 5), 10)
    expect(codes(result)).toEqual(['NAIVE_TEST_INVALID'])
    expect(result.comparisons.bootstrap).toBeNull()
    expect(result.balancedAnova).toBeNull()
  })
})

describe('analyzeNested on public data sets', () => {
  it('Dyestuff: REML, ICC with its F-based interval, design effect, balanced ANOVA check', () => {
    // Dyestuff (Davies & Goldsmith 1972), lme4 REML: σ_batch² 1764.05, σ² 2451.25, intercept 1527.5 (SE 19.38), ICC 0.4185.
    const result = analyzeNested(nestedColumnsFromTable(dyestuff, 'Yield', ['Batch']))
    expect(() => AnalysisResult.parse(result)).not.toThrow()
    expect(result.varianceComponents[0].variance).toBeCloseTo(1764.05, 1)
    expect(result.varianceComponents[1].variance).toBeCloseTo(2451.25, 1)
    expect(result.icc[0].icc).toBeCloseTo(0.4185, 4)
    // F-based ICC(1) interval, Searle 1971 / Lessells & Boag 1987, for Dyestuff: [0.0838, 0.8479] (one-way-anova.test.ts).
    expect(result.icc[0]).toMatchObject({ ciMethod: 'one-way-f' })
    expect(result.icc[0].ciLow!).toBeCloseTo(0.0838, 4)
    expect(result.icc[0].ciHigh!).toBeCloseTo(0.8479, 4)
    expect(result.designEffect).toBeCloseTo(1 + 4 * 0.41851, 3)
    const [all] = result.groups
    expect(all).toMatchObject({ condition: 'all', nObs: 30, nUnits: null })
    expect(all.clustered.estimate).toBeCloseTo(1527.5, 6)
    expect(all.clustered.se).toBeCloseTo(19.38, 2)
    expect(all.clustered.df).toBeCloseTo(5, 4) // balanced one-way: k − 1 (lmerTest gives 5)
    expect(result.comparisons).toEqual({ mixedModel: null, unitMeans: null, naive: null, bootstrap: null })
    expect(result.balancedAnova?.maxDifferenceToReml).toBeLessThan(1e-6)
    expect(result.warnings).toEqual([])
  })

  it('Dyestuff2: a boundary fit, reported plainly; clustered SE equals the naive SE', () => {
    // Dyestuff2 (Box & Tiao 1973), lme4: σ_batch² = 0, σ² ≈ 13.81, intercept 5.6656 with SE 0.6784.
    const result = analyzeNested(nestedColumnsFromTable(dyestuff2, 'Yield', ['Batch']))
    expect(result.singular).toBe(true)
    expect(result.varianceComponents[0]).toMatchObject({ level: 'Batch', variance: 0, share: 0 })
    expect(result.varianceComponents[1].variance).toBeCloseTo(13.81, 2)
    expect(result.groups[0].clustered.se).toBeCloseTo(0.6784, 4)
    expect(result.groups[0].naive.se).toBeCloseTo(result.groups[0].clustered.se, 8)
    expect(result.designEffect).toBe(1)
    expect(codes(result)).toEqual(['BOUNDARY_FIT'])
    expect(result.balancedAnova?.anyNegative).toBe(true)
  })

  it('Pastes: two levels, cumulative ICC, implicit nesting of cask labels', () => {
    // Pastes (Davies & Goldsmith 1972), lme4 REML: σ_batch² ≈ 1.657, σ_cask:batch² ≈ 8.434, σ² ≈ 0.678, intercept SE ≈ 0.6769.
    const result = analyzeNested(nestedColumnsFromTable(pastes, 'strength', ['batch', 'cask']))
    const [batch, cask, residual] = result.varianceComponents.map((c) => c.variance)
    expect(batch).toBeCloseTo(1.657, 3)
    expect(cask).toBeCloseTo(8.434, 3)
    expect(residual).toBeCloseTo(0.678, 3)
    expect(result.groups[0].clustered.se).toBeCloseTo(0.6769, 4)
    const total = batch + cask + residual
    expect(result.icc.map((i) => i.icc)).toEqual([
      expect.closeTo(batch / total, 10),
      expect.closeTo((batch + cask) / total, 10),
    ])
    expect(result.icc[0].ciLow).toBeNull()
    // Design effect, common practice, no source: 1 + (6 − 1)ρ_batch + (2 − 1)ρ_cask for 6 assays per batch, 2 per cask.
    expect(result.designEffect).toBeCloseTo(1 + 5 * (batch / total) + cask / total, 10)
    expect(result.levels).toEqual([
      { name: 'batch', nUnits: 10, minUnitSize: 6, meanUnitSize: 6, maxUnitSize: 6, unitSizeCv: 0 },
      { name: 'cask', nUnits: 30, minUnitSize: 2, meanUnitSize: 2, maxUnitSize: 2, unitSizeCv: 0 },
    ])
    expect(result.implicitNesting).toEqual([{ level: 'cask', nRepeatedLabels: 3, examples: ['a', 'b', 'c'] }])
    expect(codes(result)).toEqual(['IMPLICIT_NESTING'])
    expect(result.balancedAnova?.maxDifferenceToReml).toBeLessThan(1e-6)
  })

  it('Machines: condition within workers adds the worker × condition level; no unit-means test', () => {
    // Machines (Milliken & Johnson 1992): lmerTest anova (Satterthwaite) F = 20.576 on 2 and 10 df (see omnibus-f.ts).
    const result = analyzeNested(nestedColumnsFromTable(machines, 'score', ['Worker'], 'Machine'))
    expect(() => AnalysisResult.parse(result)).not.toThrow()
    expect(result.varianceComponents.map((c) => c.level)).toEqual(['Worker', 'Worker:condition', 'residual'])
    expect(result.conditionLevel).toBeNull()
    expect(result.levels.map((l) => l.name)).toEqual(['Worker'])
    expect(result.icc.map((i) => i.level)).toEqual(['Worker', 'Worker:condition'])
    const omnibus = result.comparisons.mixedModel!.omnibus!
    expect(omnibus.f).toBeCloseTo(20.576, 3)
    expect(omnibus.df1).toBe(2)
    expect(omnibus.df2).toBeCloseTo(10, 3)
    expect(result.comparisons.mixedModel!.contrasts.map((c) => `${c.a}-${c.b}`)).toEqual([
      'B-A',
      'C-A',
      'C-B',
    ])
    expect(result.comparisons.unitMeans).toBeNull()
    expect(result.comparisons.naive).toMatchObject({ method: 'one-way-anova', df1: 2, df2: 51 })
    expect(result.groups.map((g) => g.nUnits)).toEqual([null, null, null])
    expect(codes(result)).toEqual(['UNIT_MEANS_UNAVAILABLE', 'NAIVE_TEST_INVALID'])
  })

  it('Oxide: the source is carried by lots, the outermost level, so it is confounded with lots', () => {
    // Oxide (Littell et al. 1996; nlme): Source varies between Lots only.
    const result = analyzeNested(nestedColumnsFromTable(oxide, 'Thickness', ['Lot', 'Wafer'], 'Source'))
    expect(result.conditionLevel).toBe('Lot')
    expect(result.comparisons.unitMeans).toMatchObject({ method: 'student-t', level: 'Lot', nUnits: 8 })
    expect(codes(result)).toContain('CONDITION_CONFOUNDED')
    expect(result.groups.map((g) => g.nUnits)).toEqual([4, 4])
  })
})

describe('analyzeNested with three conditions between animals (invented data)', () => {
  // 9 animals, 3 per arm, 3 cells each; values chosen by hand.
  const table = {
    animal: [
      'a1',
      'a1',
      'a1',
      'a2',
      'a2',
      'a2',
      'a3',
      'a3',
      'a3',
      'b1',
      'b1',
      'b1',
      'b2',
      'b2',
      'b2',
      'b3',
      'b3',
      'b3',
      'c1',
      'c1',
      'c1',
      'c2',
      'c2',
      'c2',
      'c3',
      'c3',
      'c3',
    ],
    dose: [...Array(9).fill('0 µM'), ...Array(9).fill('1 µM'), ...Array(9).fill('10 µM')],
    length: [
      10, 12, 11, 13, 12, 14, 9, 11, 10, 14, 13, 15, 12, 14, 13, 16, 15, 17, 18, 17, 19, 15, 16, 17, 20, 18,
      19,
    ],
  }
  const result = analyzeNested(nestedColumnsFromTable(table, 'length', ['animal'], 'dose'))

  it('gives an omnibus F, three Holm-adjusted contrasts and an ANOVA on unit means', () => {
    expect(() => AnalysisResult.parse(result)).not.toThrow()
    const { omnibus, contrasts } = result.comparisons.mixedModel!
    expect(contrasts).toHaveLength(3)
    // Holm (1979): the smallest p is multiplied by 3.
    const smallest = contrasts.reduce((a, b) => (a.p < b.p ? a : b))
    expect(smallest.pHolm).toBeCloseTo(Math.min(1, 3 * smallest.p), 12)
    // Unit means: 11, 13, 10 | 14, 13, 16 | 18, 16, 19 (by hand). Balanced one-level design: the mixed-model F
    // equals the one-way ANOVA F on unit means (common practice, no source).
    const unitMeans = result.comparisons.unitMeans
    if (unitMeans?.method !== 'one-way-anova') throw new Error('expected an ANOVA on unit means')
    const groups = [
      [11, 13, 10],
      [14, 13, 16],
      [18, 16, 19],
    ]
    const grand = groups.flat().reduce((s, v) => s + v, 0) / 9
    const msb = groups.reduce((s, g) => s + 3 * (g.reduce((a, b) => a + b, 0) / 3 - grand) ** 2, 0) / 2
    const msw =
      groups.reduce((s, g) => {
        const m = g.reduce((a, b) => a + b, 0) / 3
        return s + g.reduce((a, v) => a + (v - m) ** 2, 0)
      }, 0) / 6
    expect(unitMeans.f).toBeCloseTo(msb / msw, 10)
    expect(unitMeans).toMatchObject({ df1: 2, df2: 6, nUnits: 9 })
    expect(omnibus!.f).toBeCloseTo(msb / msw, 5)
    expect(omnibus!.df2).toBeCloseTo(6, 4)
    expect(unitMeans.p).toBeCloseTo(1 - jStat.centralF.cdf(msb / msw, 2, 6), 10)
    expect(result.comparisons.naive).toMatchObject({ method: 'one-way-anova', df1: 2, df2: 24 })
    expect(codes(result)).toEqual(['NAIVE_TEST_INVALID'])
  })

  it('honours the reference condition', () => {
    const other = analyzeNested(nestedColumnsFromTable(table, 'length', ['animal'], 'dose'), {
      reference: '10 µM',
    })
    expect(other.reference).toBe('10 µM')
    expect(other.comparisons.mixedModel!.contrasts[0]).toMatchObject({ a: '0 µM', b: '10 µM' })
  })

  it('runs a reproducible hierarchical bootstrap oriented like the contrasts', () => {
    const columns = nestedColumnsFromTable(table, 'length', ['animal'], 'dose')
    const a = analyzeNested(columns, { bootstrap: { resamples: 200, seed: 'check' } })
    const b = analyzeNested(columns, { bootstrap: { resamples: 200, seed: 'check' } })
    expect(a.comparisons.bootstrap).toEqual(b.comparisons.bootstrap)
    const bootstrap = a.comparisons.bootstrap!
    expect(bootstrap).toMatchObject({ resamples: 200, seed: 'check', confidence: 0.95 })
    expect(bootstrap.contrasts.map((c) => [c.a, c.b])).toEqual(
      a.comparisons.mixedModel!.contrasts.map((c) => [c.a, c.b]),
    )
    // The bootstrap's point estimate is the plain difference of the condition means of the observations.
    const mean = (label: string) => a.groups.find((g) => g.condition === label)!.mean
    for (const c of bootstrap.contrasts) expect(c.estimate).toBeCloseTo(mean(c.a) - mean(c.b), 12)
    expect(() => analyzeNested(columns, { bootstrap: { resamples: 50, seed: 'x' } })).toThrow(
      EngineInputError,
    )
  })
})

describe('analyzeNested warnings and guards', () => {
  it('warns about few units per condition, a confounded lab and dropped rows', () => {
    const table = {
      lab: ['L1', 'L1', 'L1', 'L1', 'L2', 'L2', 'L2', 'L2', 'L3', 'L3', 'L3', 'L3'],
      animal: ['1', '1', '2', '2', '1', '1', '2', '2', '1', '1', '2', '2'],
      treatment: [
        'vehicle',
        'vehicle',
        'vehicle',
        'vehicle',
        'NW-117',
        'NW-117',
        'NW-117',
        'NW-117',
        'vehicle',
        'vehicle',
        'vehicle',
        'vehicle',
      ],
      length: [1, 2, 2, 3, 5, 6, 6, NaN, 2, 1, 3, 3],
    }
    const result = analyzeNested(nestedColumnsFromTable(table, 'length', ['lab', 'animal'], 'treatment'))
    expect(result.nDropped).toBe(1)
    expect(result.nObs).toBe(11)
    expect(result.conditionLevel).toBe('lab')
    expect(codes(result)).toEqual([
      'ROWS_DROPPED',
      'IMPLICIT_NESTING',
      'SINGLE_OBSERVATION_UNITS',
      'FEW_OUTER_UNITS',
      'FEW_UNITS',
      'CONDITION_CONFOUNDED',
      'BOUNDARY_FIT',
      'NAIVE_TEST_INVALID',
    ])
    expect(result.warnings.find((w) => w.code === 'FEW_UNITS')!.message).toContain('"NW-117" has 1 lab unit')
    // Lab means by hand: L1 2, L3 2.25 (vehicle) and L2 17/3 (NW-117): a t-test with 1 df.
    expect(result.comparisons.unitMeans).toMatchObject({
      method: 'student-t',
      level: 'lab',
      nUnits: 3,
      df: 1,
    })
    expect(result.comparisons.unitMeans).toHaveProperty('estimate', expect.closeTo(17 / 3 - 2.125, 12))
  })

  it('rejects thin input with EngineInputError naming the problem', () => {
    const oneLab = { lab: ['A', 'A', 'A'], length: [1, 2, 3] }
    expect(() => analyzeNested(nestedColumnsFromTable(oneLab, 'length', ['lab']))).toThrow(/only 1 unit/)
    const single = {
      animal: ['a', 'a', 'b', 'b', 'c'],
      treatment: ['x', 'x', 'x', 'x', 'y'],
      length: [1, 2, 3, 4, 5],
    }
    expect(() => analyzeNested(nestedColumnsFromTable(single, 'length', ['animal'], 'treatment'))).toThrow(
      'The condition "y" has 1 observation; at least 2 per condition are needed.',
    )
    const flat = { animal: ['a', 'a', 'b', 'b'], length: [2, 2, 2, 2] }
    expect(() => analyzeNested(nestedColumnsFromTable(flat, 'length', ['animal']))).toThrow(EngineInputError)
    expect(() =>
      analyzeNested(nestedColumnsFromTable(sixAnimals, 'length', ['animal'], 'treatment'), {
        reference: 'saline',
      }),
    ).toThrow(/saline/)
  })
})

describe('analyzeNested beforeBootstrap (common practice, no source)', () => {
  it('announces the bootstrap only when one is asked for', () => {
    const columns = nestedColumnsFromTable(dyestuff, 'Yield', ['Batch'])
    let calls = 0
    analyzeNested(columns, { beforeBootstrap: () => calls++ })
    expect(calls).toBe(0)
    const result = analyzeNested(columns, {
      bootstrap: { resamples: 100, seed: 's' },
      beforeBootstrap: () => calls++,
    })
    expect(calls).toBe(1)
    expect(result.comparisons.bootstrap?.resamples).toBe(100)
  })
})
