import { describe, expect, it } from 'vitest'
import { analyzeNested } from '../analysis/analyze-nested'
import { inventedNeuronTable } from '../analysis/fixtures/invented-glmm-tables'
import { bacteria } from '../stats/fixtures/bacteria'
import { grouseticks } from '../stats/fixtures/grouseticks'
import { nestedColumnsFromTable } from '../stats/fixtures/nested-columns-from-table'
import { comparisonRows, hasPerComparisonDesignEffect } from './comparison-rows'
import { coefficientRows, coefficientStatistic, termRows, termStatistic } from './fixed-effect-rows'
import { reportText } from './report-text'

/**
 * The words of binary and count results, on what the engine really returns: MASS `bacteria`
 * (binomial, y ~ trt + (1|ID)), lme4 `grouseticks` (Poisson) and an invented table of
 * marker-positive neurons. Numbers quoted from glmer are in the engine's own tests
 * (analyze-nested-glmm.test.ts); here only the wording rules are checked (the product's number
 * style, common practice, no source).
 */

const settings = { bootstrap: { enabled: false, resamples: 2000, seed: '1' } }
const software = 'Nestwise 0.3.0'

const bacteriaResult = analyzeNested(
  { ...nestedColumnsFromTable(bacteria, 'y', ['ID'], 'trt'), family: 'binomial' },
  { reference: { trt: 'placebo' } },
)
const marker = inventedNeuronTable()
const markerResult = {
  ...analyzeNested(
    { ...nestedColumnsFromTable(marker, 'marker01', ['lab', 'mouse'], 'treatment'), family: 'binomial' },
    { reference: { treatment: 'vehicle' } },
  ),
  outcome: { positive: 'positive', negative: 'negative' },
}
const ticks = analyzeNested(
  {
    ...nestedColumnsFromTable(grouseticks, 'TICKS', ['LOCATION', 'BROOD', 'INDEX'], 'YEAR'),
    family: 'poisson',
  },
  { reference: { YEAR: '95' } },
)

describe('comparison rows of a binary response', () => {
  const rows = comparisonRows(bacteriaResult)

  it('gives each pair as an odds ratio with its Wald interval, z and Holm p, without df', () => {
    const drug = rows.find((r) => r.id === 'model-drug-placebo')!
    // glmer: log odds ratio −1.2021 (see analyze-nested-glmm.test.ts) → OR exp(−1.2021) = 0.3006.
    expect(drug).toMatchObject({
      method: 'Mixed model (Laplace, Wald z)',
      what: 'drug vs placebo',
      estimate: 'OR 0.301',
      df: '—',
    })
    expect(drug.statistic).toMatch(/^z = -2\.06$/)
    expect(drug.p).toMatch(/\(Holm\)$/)
    expect(hasPerComparisonDesignEffect(rows)).toBe(true)
  })

  it('names the check on unit proportions and strikes through the pooled χ² test', () => {
    expect(rows.find((r) => r.id === 'unit-means')!.method).toBe(
      'Test on unit proportions (50 units of “ID”)',
    )
    const naive = rows.at(-1)!
    expect(naive).toMatchObject({ id: 'naive', df: '2', reasonBelow: true })
    expect(naive.statistic).toMatch(/^χ² = /)
    expect(naive.wrongBecause).toContain('220 observations as independent')
  })
})

describe('comparison rows of a count response', () => {
  const rows = comparisonRows(ticks)
  it('gives rate ratios and the naive GLM’s χ² tests, struck through', () => {
    expect(rows[0].estimate).toMatch(/^RR /)
    const naive = rows.filter((r) => r.wrongBecause)
    expect(naive.map((r) => r.method)).toEqual(['Naive GLM without units (every observation independent)'])
    expect(naive[0]).toMatchObject({ what: 'YEAR', df: '2' })
  })
})

describe('fixed-effect rows of a binary response', () => {
  const model = bacteriaResult.comparisons.mixedModel!

  it('reads coefficients on the log-odds scale with z, no df, and each odds ratio', () => {
    expect(coefficientStatistic(model.coefficients!)).toBe('z')
    const rows = coefficientRows(model.coefficients!, bacteriaResult)
    expect(rows[0]).toMatchObject({ reads: 'log odds at trt = placebo', df: '—', ratio: '—' })
    expect(rows[2]).toMatchObject({ reads: 'log odds ratio of drug against placebo', df: '—' })
    // Same Wald interval as the contrast drug vs placebo: exp(β ± 1.96 SE).
    const drug = model.contrasts.find((c) => c.a === 'drug' && c.b === 'placebo')!
    expect('ratio' in drug).toBe(true)
    expect(rows[2].ratio).toBe(`OR ${comparisonRows(bacteriaResult)[1].estimate.slice(3)} [0.0958, 0.943]`)
  })

  it('gives the term test as a Wald χ² with its df', () => {
    expect(termStatistic(model.terms!)).toBe('χ²')
    expect(termRows(model.terms!)).toEqual([
      {
        id: 'trt',
        term: 'trt',
        statistic: 'χ²',
        value: expect.any(String),
        df1: '2',
        df2: '—',
        p: 'p = 0.12',
      },
    ])
  })
})

describe('“How to report this” for a binary response', () => {
  const text = reportText({ result: markerResult, settings, software })

  it('names the model, its fitting method, the formula with its family, and the latent scale', () => {
    expect(text.methods).toContain(
      '“marker01” (yes = “positive”) was compared between the conditions of “treatment”',
    )
    expect(text.methods).toContain(
      'logistic mixed model (binomial, logit link) fitted by maximum likelihood (Laplace approximation)',
    )
    expect(text.methods).toContain('family binomial(link = "logit")')
    expect(text.methods).toContain('latent (log odds) scale, with a residual variance of π²/3')
    expect(text.methods).toContain('Nakagawa, Johnson & Schielzeth 2017')
    expect(text.methods).not.toContain('Satterthwaite')
  })

  it('counts the independent units and names the check on unit proportions', () => {
    expect(text.methods).toContain(
      'n = 12 (vehicle), 12 (QZ-41) units of “mouse”, with 622 observations in all',
    )
    expect(text.methods).toContain("Student's t-test was run on the proportions of the 24 units of “mouse”")
  })

  it('reports the odds ratio with its interval, z and p, and the typical unit’s proportions', () => {
    const c = markerResult.comparisons.mixedModel!.contrasts[0]
    expect('ratio' in c).toBe(true)
    expect(text.results).toMatch(
      /^For “marker01” \(yes = “positive”\), QZ-41 versus vehicle: odds ratio \d\.\d\d \(95% CI \[[\d.]+, [\d.]+\]; z = [\d.]+, p = [\d.]+; n = 12 vs 12 units of “mouse”\); logistic mixed model, Wald tests\./,
    )
    expect(text.results).toContain(
      'The model’s proportions for a typical mouse (random effects at 0), with 95% CIs: vehicle 0.',
    )
    // A level × condition variance is read on the link scale, never in the response's units.
    expect(text.results).toContain('“lab × treatment” variance')
  })

  it('speaks of successes out of trials for the aggregated form', () => {
    const aggregated = reportText({
      result: { ...bacteriaResult, outcome: undefined },
      settings: { ...settings, trials: 'swabs' },
      software,
    })
    expect(aggregated.methods).toMatch(/^The successes in “y” out of the trials in “swabs” were compared/)
  })

  it('gives the χ² test across three conditions, then Holm-adjusted pairs', () => {
    const three = reportText({ result: bacteriaResult, settings, software })
    expect(three.results).toMatch(/^Across conditions of “trt”, Wald χ²\(2\) = 4\.29, p = 0\.12/)
    expect(three.results).toContain('drug versus placebo: odds ratio 0.301')
    expect(three.results).toContain('Holm-adjusted')
  })
})

describe('“How to report this” for a count response', () => {
  const text = reportText({ result: ticks, settings, software })
  it('speaks of counts, rate ratios and the log link’s latent residual', () => {
    expect(text.methods).toMatch(/^The counts in “TICKS” were compared/)
    expect(text.methods).toContain('Poisson mixed model (log link)')
    expect(text.methods).toContain('ln(1 + 1/λ)')
    expect(text.results).toContain('rate ratio')
    expect(text.results).toContain('The model’s rates for a typical BROOD (random effects at 0)')
  })
})
