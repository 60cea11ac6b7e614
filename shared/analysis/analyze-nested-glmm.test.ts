import { describe, expect, it } from 'vitest'
import { AnalysisResult, type WaldContrast } from '../schemas/analysis-result'
import { EngineInputError } from '../stats/engine-input-error'
import { bacteria } from '../stats/fixtures/bacteria'
import { grouseticks } from '../stats/fixtures/grouseticks'
import { nestedColumnsFromTable } from '../stats/fixtures/nested-columns-from-table'
import { analyzeNested } from './analyze-nested'
import { noLabEffectTable } from './fixtures/invented-glmm-tables'

const codes = (r: AnalysisResult) => r.warnings.map((w) => w.code)

describe('analyzeNested, binary response (MASS bacteria)', () => {
  const result = analyzeNested(
    { ...nestedColumnsFromTable(bacteria, 'y', ['ID'], 'trt'), family: 'binomial' },
    { reference: { trt: 'placebo' } },
  )
  const mixed = result.comparisons.mixedModel!

  it('matches the result schema and names the family', () => {
    expect(() => AnalysisResult.parse(result)).not.toThrow()
    expect(result.family).toBe('binomial')
    expect(result.model).toMatchObject({ formula: 'y ~ trt + (1|ID)', family: 'binomial(link = "logit")' })
    expect(result.remlCriterion).toBeNull()
  })

  it('gives latent-scale variance shares with the logit residual π²/3 (Nakagawa et al. 2017)', () => {
    // glmer: σ²_ID = 0.9660943 (see fit-nested-glmm.test.ts); ICC = σ² / (σ² + π²/3).
    const [id, residual] = result.varianceComponents
    expect(residual).toMatchObject({ level: 'residual' })
    expect(residual.variance).toBeCloseTo((Math.PI * Math.PI) / 3, 12)
    expect(result.icc[0].icc).toBeCloseTo(0.9660943 / (0.9660943 + (Math.PI * Math.PI) / 3), 5)
    expect(id.share + residual.share).toBeCloseTo(1, 12)
  })

  it('reports coefficients as Wald z and contrasts as odds ratios with intervals', () => {
    expect(mixed.coefficients!.map((c) => [c.term, c.level])).toEqual([
      ['(intercept)', null],
      ['trt', 'drug+'],
      ['trt', 'drug'],
    ])
    expect('z' in mixed.coefficients![2] && mixed.coefficients![2].z).toBeCloseTo(
      -1.202120099 / 0.5834420832,
      3,
    )
    const drug = mixed.contrasts.find((c) => c.a === 'drug' && c.b === 'placebo') as WaldContrast
    expect(drug.ratio).toBeCloseTo(Math.exp(-1.202120099), 4)
    expect(drug.ratioLow).toBeCloseTo(Math.exp(drug.ci[0]), 12)
    expect(drug.ratioHigh).toBeCloseTo(Math.exp(drug.ci[1]), 12)
    expect(mixed.contrasts.map((c) => c.pHolm).every((p, i) => p >= mixed.contrasts[i].p)).toBe(true)
    expect(mixed.terms).toEqual([expect.objectContaining({ term: 'trt', df: 2 })])
  })

  it('has a design effect per comparison and plain, naive and model proportions per arm', () => {
    const first = mixed.contrasts[0] as WaldContrast
    expect(result.headline).toMatchObject({ label: `${first.a} − ${first.b}` })
    expect(result.designEffect).toBe(first.designEffect)
    expect(first.designEffect).toBeGreaterThan(1)
    const placebo = result.groups.find((g) => g.condition === 'placebo')!
    expect(placebo.mean).toBeCloseTo(84 / 96, 12) // 84 of the 96 placebo swabs were positive (by count)
    expect(placebo.clustered.df).toBeNull()
    expect(placebo.clustered.ciLow).toBeLessThan(placebo.clustered.estimate)
    expect(placebo.nUnits).toBe(21)
  })

  it('keeps the naive χ² and the test on children’s proportions (R: chisq.test and a one-way ANOVA)', () => {
    // R 4.x: chisq.test(table(trt, y), correct = FALSE) X² = 6.658529039 on 2 df;
    // anova(lm(proportion ~ trt)) over the 50 children: F = 1.746306067, p = 0.1855433757.
    expect(result.comparisons.naive).toMatchObject({ method: 'chi-square', df: 2 })
    if (result.comparisons.naive?.method !== 'chi-square') throw new Error('expected χ²')
    expect(result.comparisons.naive.chisq).toBeCloseTo(6.658529039, 8)
    expect(result.comparisons.unitMeans).toMatchObject({ method: 'one-way-anova', level: 'ID', nUnits: 50 })
    if (result.comparisons.unitMeans?.method !== 'one-way-anova') throw new Error('expected an ANOVA')
    expect(result.comparisons.unitMeans.f).toBeCloseTo(1.746306067, 8)
    expect(result.comparisons.unitMeans.p).toBeCloseTo(0.1855433757, 8)
    expect(codes(result)).toEqual(['NAIVE_TEST_INVALID'])
  })
})

describe('analyzeNested, count response (lme4 grouseticks)', () => {
  it('warns about overdispersion without an observation-level term, and not with one', () => {
    const columns = {
      ...nestedColumnsFromTable(grouseticks, 'TICKS', ['LOCATION', 'BROOD'], 'YEAR'),
      family: 'poisson' as const,
    }
    expect(codes(analyzeNested(columns))).toContain('OVERDISPERSED')
    const withIndex = analyzeNested({
      ...nestedColumnsFromTable(grouseticks, 'TICKS', ['LOCATION', 'BROOD', 'INDEX'], 'YEAR'),
      family: 'poisson',
    })
    expect(codes(withIndex)).not.toContain('OVERDISPERSED')
    expect(codes(withIndex)).not.toContain('SINGLE_OBSERVATION_UNITS')
    expect(withIndex.varianceComponents.at(-1)!.level).toBe('residual')
    expect(withIndex.comparisons.naive).toMatchObject({ method: 'glm' })
  })
})

describe('analyzeNested refuses a response its family cannot take', () => {
  const columns = nestedColumnsFromTable(bacteria, 'y', ['ID'], 'trt')
  it('names the first row that is not 0 or 1', () => {
    const response = Float64Array.from(columns.response)
    response[7] = 2
    expect(() => analyzeNested({ ...columns, response, family: 'binomial' })).toThrow(EngineInputError)
    expect(() => analyzeNested({ ...columns, response, family: 'binomial' })).toThrow(
      /Row 8 .* must be 0 or 1/,
    )
  })
  it('names a negative or fractional count', () => {
    const response = Float64Array.from(columns.response)
    response[3] = -1
    expect(() => analyzeNested({ ...columns, response, family: 'poisson' })).toThrow(/Row 4 .* not a count/)
  })
  it('names more successes than trials', () => {
    const trials = new Float64Array(columns.response.length).fill(1)
    const response = Float64Array.from(columns.response)
    response[0] = 3
    expect(() => analyzeNested({ ...columns, response, trials, family: 'binomial' })).toThrow(
      /Row 1 has 3 successes out of 1 trials/,
    )
  })
})

describe('analyzeNested, a real boundary fit (invented data without any lab effect)', () => {
  // Seeded, see fixtures/invented-glmm-tables.ts: 4 labs × 8 mice, 647 neurons, spread between
  // mice only. Live glmer comparison of this table: tests/reference/glmm-boundary-reference.test.ts.
  const result = analyzeNested(
    {
      ...nestedColumnsFromTable(noLabEffectTable(), 'marker01', ['lab', 'mouse'], 'treatment'),
      family: 'binomial',
    },
    { reference: { treatment: 'vehicle' } },
  )

  it('estimates the lab variances at 0, says so plainly and still converges', () => {
    expect(result.model!.formula).toBe('marker01 ~ treatment + (1|lab) + (1|lab:treatment) + (1|lab:mouse)')
    const variance = Object.fromEntries(result.varianceComponents.map((v) => [v.level, v.variance]))
    expect(variance.lab).toBe(0)
    expect(variance['lab:treatment']).toBe(0)
    // lme4 1.1-31 glmer (bobyqa, rhoend 1e-10, tolPwrss 1e-13), run once on this table: isSingular TRUE,
    // σ²_lab = σ²_lab:treatment = 0, σ²_lab:mouse = 0.420011569.
    expect(variance.mouse / 0.420011569).toBeCloseTo(1, 4)
    expect(result.singular).toBe(true)
    expect(result.converged).toBe(true)
    expect(codes(result)).toContain('BOUNDARY_FIT')
    expect(codes(result)).not.toContain('NOT_CONVERGED')
    const boundary = result.warnings.find((w) => w.code === 'BOUNDARY_FIT')!
    expect(boundary.message).toContain('"lab", "lab:treatment" units was estimated as 0')
  })

  it('keeps the fixed effects of glmer at the boundary', () => {
    // lme4 1.1-31 glmer as above: treatmentQZ-41 0.8974177123 (SE 0.2863734173), intercept −0.1986433535
    // (SE 0.2019085580).
    const [intercept, treated] = result.comparisons.mixedModel!.coefficients! as {
      estimate: number
      se: number
    }[]
    expect(intercept.estimate / -0.1986433535).toBeCloseTo(1, 4)
    expect(intercept.se / 0.201908558).toBeCloseTo(1, 4)
    expect(treated.estimate / 0.8974177123).toBeCloseTo(1, 4)
    expect(treated.se / 0.2863734173).toBeCloseTo(1, 4)
  })
})
