import { describe, expect, it } from 'vitest'
import {
  AnalysisResult,
  type Coefficient,
  type MixedModelContrast,
  type TermTest,
} from '../schemas/analysis-result'
import { analyzeNested } from './analyze-nested'
import { EngineInputError } from '../stats/engine-input-error'
import { dyestuff } from '../stats/fixtures/dyestuff'
import { dyestuff2 } from '../stats/fixtures/dyestuff2'
import { machines } from '../stats/fixtures/machines'
import { nestedColumnsFromTable } from '../stats/fixtures/nested-columns-from-table'
import { oxide } from '../stats/fixtures/oxide'
import { pastes } from '../stats/fixtures/pastes'
import { simulateNestedTable } from '../stats/fixtures/simulate-nested-table'

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
    const contrast = result.comparisons.mixedModel!.contrasts[0] as MixedModelContrast
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

  it('Machines: condition within workers adds the worker × machine term; no unit-means test', () => {
    // Machines (Milliken & Johnson 1992): lmerTest anova (Satterthwaite) F = 20.576 on 2 and 10 df (see omnibus-f.ts).
    const result = analyzeNested(nestedColumnsFromTable(machines, 'score', ['Worker'], 'Machine'))
    expect(() => AnalysisResult.parse(result)).not.toThrow()
    expect(result.varianceComponents.map((c) => c.level)).toEqual(['Worker', 'Worker:Machine', 'residual'])
    expect(result.model!.formula).toBe('score ~ Machine + (1|Worker) + (1|Worker:Machine)')
    expect(result.conditionLevel).toBeNull()
    expect(result.levels.map((l) => l.name)).toEqual(['Worker'])
    expect(result.icc.map((i) => i.level)).toEqual(['Worker', 'Worker:Machine'])
    // lme4 VarCorr: Worker:Machine 13.909 → the machine effect differs between workers by √(2 · 13.909) = 5.27.
    expect(result.effectVariation).toEqual([
      expect.objectContaining({ term: 'Worker:Machine', level: 'Worker', factor: 'Machine', nUnits: 6 }),
    ])
    expect(result.effectVariation![0].effectSd).toBeCloseTo(Math.sqrt(2 * 13.909), 2)
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
    // R 4.x: pf(12.904761904761905, 2, 6, lower.tail = FALSE) = 0.00671092287797026 (F = MSB / MSW here).
    expect(unitMeans.p / 0.00671092287797026).toBeCloseTo(1, 10)
    expect(result.comparisons.naive).toMatchObject({ method: 'one-way-anova', df1: 2, df2: 24 })
    expect(codes(result)).toEqual(['NAIVE_TEST_INVALID'])
  })

  it('honours the reference condition', () => {
    const other = analyzeNested(nestedColumnsFromTable(table, 'length', ['animal'], 'dose'), {
      reference: { dose: '10 µM' },
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
        reference: { treatment: 'saline' },
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

describe('analyzeNested with two factors and a covariate (invented data)', () => {
  // Invented: 5 labs; genotype carried by the mice, treatment on two coverslips of each mouse,
  // soma size per neuron. Checked against lmerTest live in tests/reference; here: the shape.
  const table = simulateNestedTable({
    seed: 'analysis-two-factors',
    labs: 5,
    animals: [4, 6],
    cells: [3, 8],
    sd: { lab: 1, labCondition: 0.6, animal: 0.7, animalCondition: 0.4, residual: 1.5 },
    conditions: ['vehicle', 'KX-9'],
    means: [20, 21],
    conditionAt: 'within',
    genotype: { labels: ['WT', 'KO'], effects: [0, -1.2], interaction: 0.8 },
    somaSlope: 0.05,
  })
  const result = analyzeNested(
    nestedColumnsFromTable(table, 'length', ['lab', 'animal'], ['genotype', 'condition'], ['soma']),
  )
  const mixed = result.comparisons.mixedModel!

  it('matches the result schema and names the model in lme4 notation', () => {
    expect(() => AnalysisResult.parse(result)).not.toThrow()
    expect(result.model!.formula).toBe(
      'length ~ genotype * condition + soma + (1|lab) + (1|lab:genotype) + (1|lab:condition) + (1|lab:genotype:condition) + (1|lab:animal) + (1|lab:animal:condition)',
    )
    expect(result.condition).toBe('genotype:condition')
    expect(result.reference).toBe('WT:vehicle')
    expect(result.factors!.map((f) => [f.name, f.level])).toEqual([
      ['genotype', 'animal'],
      ['condition', null],
    ])
    expect(result.covariates).toEqual([expect.objectContaining({ name: 'soma', level: null })])
  })

  it('names the coefficients as the contract says', () => {
    expect(mixed.coefficients!.map((c) => [c.term, c.level])).toEqual([
      ['(intercept)', null],
      ['genotype', 'KO'],
      ['condition', 'KX-9'],
      ['soma', null],
      ['genotype:condition', 'KO:KX-9'],
    ])
    expect((mixed.terms as TermTest[]).map((t) => [t.term, t.df1])).toEqual([
      ['genotype', 1],
      ['condition', 1],
      ['soma', 1],
      ['genotype:condition', 1],
    ])
    // A one-df term's F is the square of its coefficient's t (the interaction and the slope).
    for (const name of ['soma', 'genotype:condition']) {
      const term = (mixed.terms as TermTest[]).find((t) => t.term === name)!
      const coefficient = (mixed.coefficients as Coefficient[]).find((c) => c.term === name)!
      expect(term.f / coefficient.t ** 2).toBeCloseTo(1, 8)
    }
  })

  it('reports design cells, their pairwise contrasts and the simple effects', () => {
    expect(result.groups.map((g) => g.condition)).toEqual(['WT:vehicle', 'WT:KX-9', 'KO:vehicle', 'KO:KX-9'])
    expect(result.groups[3].factorLevels).toEqual({ genotype: 'KO', condition: 'KX-9' })
    expect(mixed.contrasts).toHaveLength(6)
    expect(mixed.omnibus).toBeNull()
    expect(mixed.simpleEffects!.map((e) => `${e.factor}@${e.at.level}`)).toEqual([
      'genotype@vehicle',
      'genotype@KX-9',
      'condition@WT',
      'condition@KO',
    ])
    const inWt = mixed.simpleEffects!.find((e) => e.factor === 'condition' && e.at.level === 'WT')!
    const cell = mixed.contrasts.find((c) => c.a === 'WT:KX-9' && c.b === 'WT:vehicle')!
    expect(inWt.contrasts[0].estimate).toBeCloseTo(cell.estimate, 10)
    expect(inWt.test.f).toBeCloseTo(inWt.contrasts[0].t ** 2, 8)
  })

  it('has no unit level carrying one cell, and a naive least-squares fit', () => {
    expect(result.conditionLevel).toBeNull()
    expect(result.comparisons.unitMeans).toBeNull()
    expect(codes(result)).toContain('UNIT_MEANS_UNAVAILABLE')
    expect(result.comparisons.naive).toMatchObject({ method: 'linear-model' })
    expect(result.headline!.label).toBe('KO − WT (averaged over condition)')
  })

  it('warns, and does not fail, when one genotype × treatment cell has a single mouse', () => {
    // Invented: mice carry both factors, 3 mice in each cell but KO with KX-9 (1 mouse), 6 cells each.
    const cells: [string, string, number][] = [
      ['WT', 'vehicle', 3],
      ['WT', 'KX-9', 3],
      ['KO', 'vehicle', 3],
      ['KO', 'KX-9', 1],
    ]
    const t: Record<string, string[]> = { mouse: [], genotype: [], treatment: [], y: [] }
    let mouse = 0
    for (const [genotype, treatment, mice] of cells)
      for (let i = 0; i < mice; i++) {
        mouse++
        for (let j = 0; j < 6; j++) {
          t.mouse.push(`m${mouse}`)
          t.genotype.push(genotype)
          t.treatment.push(treatment)
          t.y.push(String(10 + ((mouse * 7) % 5) * 0.4 + ((j * 3) % 4) * 0.3))
        }
      }
    const single = analyzeNested(nestedColumnsFromTable(t, 'y', ['mouse'], ['genotype', 'treatment']), {
      reference: { genotype: 'WT', treatment: 'vehicle' },
    })
    const warning = single.warnings.find((w) => w.code === 'FEW_UNITS')!
    expect(warning.message).toMatch(/^"KO:KX-9" has 1 mouse unit\./)
    // One level, the same number of rows per mouse: the mixed model's F tests are the two-way
    // ANOVA of the mouse means (from memory; balanced within units, so REML gives the same F).
    const terms = single.comparisons.mixedModel!.terms!
    const anova = single.comparisons.unitMeans as { terms: { term: string; p: number }[] }
    for (const term of anova.terms) expect(terms.find((x) => x.term === term.term)!.p).toBeCloseTo(term.p, 9)
  })
})

describe('analyzeNested: design effect per comparison (Kish 1965, the ratio definition)', () => {
  it('equals 1 + (m − 1)·ICC for the mean of balanced two-level data (Dyestuff, 6 batches × 5)', () => {
    const result = analyzeNested(nestedColumnsFromTable(dyestuff, 'Yield', ['Batch']))
    expect(result.headline!.label).toBe('mean')
    expect(result.designEffect).toBeCloseTo(1 + 4 * result.icc[0].icc, 10)
    expect(result.designEffect).toBeCloseTo(result.designEffectKish, 10)
    expect(result.effectiveN).toBeCloseTo(30 / result.designEffect, 10)
  })

  it('leaves a lab variance that cancels out of a within-lab comparison out of its design effect', () => {
    // Invented: large lab differences, treatment between mice inside each lab.
    const table = simulateNestedTable({
      seed: 'cancelling-lab',
      labs: 6,
      animals: [6, 6],
      cells: [20, 20],
      sd: { lab: 8, labCondition: 0, animal: 0.5, residual: 1 },
      conditions: ['vehicle', 'KX-9'],
      means: [20, 21],
      conditionAt: 'animal',
    })
    const result = analyzeNested(nestedColumnsFromTable(table, 'length', ['lab', 'animal'], 'condition'))
    const contrast = result.comparisons.mixedModel!.contrasts[0]
    expect(result.designEffect).toBe(contrast.designEffect)
    // The table's design effect for the plain mean carries the lab variance; the comparison's does not.
    expect(result.designEffectKish).toBeGreaterThan(50)
    expect(contrast.designEffect!).toBeLessThan(10)
    expect(contrast.effectiveN!).toBeCloseTo(result.nObs / contrast.designEffect!, 8)
  })

  it('warns when a lab × condition variance rests on fewer than 5 labs', () => {
    const table = simulateNestedTable({
      seed: 'four-labs',
      labs: 4,
      animals: [6, 8],
      cells: [10, 20],
      sd: { lab: 1, labCondition: 1.5, animal: 0.5, residual: 1 },
      conditions: ['vehicle', 'KX-9'],
      means: [20, 21],
      conditionAt: 'animal',
    })
    const result = analyzeNested(nestedColumnsFromTable(table, 'length', ['lab', 'animal'], 'condition'))
    expect(result.model!.random.map((t) => t.name)).toEqual(['lab', 'lab:condition', 'animal'])
    expect(codes(result)).toContain('LEVEL_EFFECT_FEW_UNITS')
    const warning = result.warnings.find((w) => w.code === 'LEVEL_EFFECT_FEW_UNITS')!
    expect(warning.message).toMatch(/only 4 lab units/)
    // With the lab × condition variance in the model the comparison has about labs − 1 df, not mice − labs.
    expect((result.comparisons.mixedModel!.contrasts[0] as MixedModelContrast).df).toBeLessThan(6)
  })
})
