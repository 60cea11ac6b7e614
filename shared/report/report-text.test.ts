import { describe, expect, it } from 'vitest'
import { AnalysisSettings } from '../schemas/analyses'
import type { AnalysisResult, MixedModelContrast } from '../schemas/analysis-result'
import { contrastInterval } from './contrast-interval'
import demo from './fixtures/single-lab-demo.json'
import { methodsParagraph, reportText, resultsSentence } from './report-text'
import { twoFactorResult } from './fixtures/two-factor-result'

// Fixture: the engine's stored result for the seeded single-lab demo analysis (5 mice per arm).
const result = demo.result as AnalysisResult
// Settings stored by engine 0.1 ({ condition, reference, errorBar }), read through today's schema.
const settings = AnalysisSettings.parse(demo.settings)
const context = { result, settings, software: 'Nestwise 0.1.0' }

describe('contrastInterval', () => {
  it('matches R: estimate ± qt(0.975, df) · se', () => {
    // R 4.x: e <- 7.619431734895755; se <- 12.459186086713249; df <- 8.056916622693118;
    // e + c(-1, 1) * qt(0.975, df) * se  →  -21.07621  36.31508
    const [low, high] = contrastInterval(7.619431734895755, 12.459186086713249, 8.056916622693118)
    expect(low).toBeCloseTo(-21.07621, 4)
    expect(high).toBeCloseTo(36.31508, 4)
  })
})

describe('methods paragraph', () => {
  const text = methodsParagraph(context)
  it('counts the independent units per condition, not the observations', () => {
    expect(text).toContain('n = 5 (vehicle), 5 (NW-117) units of “mouse”')
    expect(text).toContain('412 observations in all')
  })
  it('names the model, the df method, the check on unit means and the software', () => {
    expect(text).toContain('linear mixed model fitted by REML')
    expect(text).toContain('random intercept for “mouse” (10 units)')
    expect(text).toContain('Satterthwaite')
    expect(text).toContain("Student's t-test was run on the means of the 10 units")
    expect(text).toContain('Nestwise 0.1.0 (statistics engine 0.1.0)')
  })
  it('mentions the bootstrap only when it ran', () => {
    expect(text).toContain('2000 resamples, seed “demo”')
    const off = { ...settings, bootstrap: { ...settings.bootstrap, enabled: false } }
    const withoutBoot = {
      ...result,
      comparisons: { ...result.comparisons, bootstrap: null },
    }
    expect(methodsParagraph({ ...context, settings: off, result: withoutBoot })).not.toContain('bootstrap')
  })
})

describe('results sentence', () => {
  it('reports the model contrast with its interval, Satterthwaite df and p', () => {
    const text = resultsSentence(context)
    expect(text).toContain('NW-117 minus vehicle: 7.62 (95% CI [-21.1, 36.3]; t(8.1) = 0.612, p = 0.56')
    expect(text).toContain('n = 5 vs 5 units of “mouse”')
  })

  it('gives the omnibus F and Holm-adjusted pairs with three conditions', () => {
    const pair = (a: string, b: string, pHolm: number): MixedModelContrast => ({
      a,
      b,
      estimate: 2,
      se: 1,
      df: 12.34,
      t: 2,
      p: pHolm / 2,
      pHolm,
    })
    const three: AnalysisResult = {
      ...result,
      comparisons: {
        ...result.comparisons,
        mixedModel: {
          omnibus: { f: 4.5, df1: 2, df2: 12.26, p: 0.0312 },
          contrasts: [pair('low', 'vehicle', 0.04), pair('high', 'vehicle', 0.0004)],
        },
      },
    }
    const text = resultsSentence({ ...context, result: three })
    expect(text).toContain('F(2, 12.3) = 4.50, p = 0.031')
    expect(text).toContain('p = 0.040, Holm-adjusted')
    expect(text).toContain('p < 0.001, Holm-adjusted')
  })

  it('describes the mean alone for a design without conditions', () => {
    const plain: AnalysisResult = {
      ...result,
      condition: null,
      reference: null,
      conditionLevel: null,
      groups: [{ ...result.groups[0], condition: 'all' }],
      comparisons: { mixedModel: null, unitMeans: null, naive: null, bootstrap: null },
    }
    const { methods, results } = reportText({ ...context, result: plain })
    expect(results).toMatch(/^The mean of “neurite_length_um” was 120 \(95% CI \[99.4, 140\]/)
    expect(methods).toContain('came from 10 units of “mouse”')
  })
})

describe('report text of engine ≥ 0.2 results', () => {
  // Invented two-factor fixture (shape only); what is checked is which sentences appear.
  const two = reportText({ ...context, result: twoFactorResult, software: 'Nestwise 0.2.0' })

  it('names both factors, the covariate, the maximal nested random part and the formula', () => {
    expect(two.methods).toContain(
      'compared between the design cells of “genotype” (WT and KO; reference WT) and “treatment” (vehicle and KX-9; reference vehicle), crossed with their interaction',
    )
    expect(two.methods).toContain('adjusted for “soma_area_um2”')
    expect(two.methods).toContain('“lab × treatment” (6 groups)')
    expect(two.methods).toContain('may differ between labs (the maximal nested model)')
    expect(two.methods).toContain(`In lme4 notation the model was ${twoFactorResult.model!.formula}.`)
  })

  it('says how terms were tested and what the headline design effect belongs to', () => {
    expect(two.methods).toContain('type III F test with Satterthwaite degrees of freedom')
    expect(two.methods).toContain(
      'a two-way ANOVA (type III) was run on the means of the 24 units of “mouse”',
    )
    expect(two.methods).toContain('For KO − WT, the design effect was 6.20 and the effective n 77.4.')
  })

  it('reports the type III tests, simple effects, the slope and how much the effect differs between labs', () => {
    expect(two.results).toMatch(
      /^Type III tests \(linear mixed model, Satterthwaite df\): genotype F\(1, 2\.0\)/,
    )
    expect(two.results).toContain('genotype × treatment F(1, 6.1) = 1.04, p = 0.35')
    expect(two.results).toContain('Simple effects: treatment within genotype = WT, KX-9 minus vehicle')
    expect(two.results).toContain('the slope for “soma_area_um2” was 0.212 per 1 µm²')
    expect(two.results).toContain(
      'The effect of treatment differs between labs by about 9.80 µm (SD; from the “lab × treatment” variance, 3 labs).',
    )
  })

  it('keeps the one-factor wording when only the new fields are added', () => {
    const oneFactorV2: AnalysisResult = {
      ...result,
      model: { formula: 'neurite_length_um ~ treatment + (1|mouse)', random: [], skipped: [] },
      headline: {
        label: 'NW-117 − vehicle',
        designEffect: result.designEffect,
        effectiveN: result.effectiveN,
      },
    }
    const text = reportText({ ...context, result: oneFactorV2 })
    expect(text.results).toBe(resultsSentence(context))
    expect(text.methods).toContain('random intercept for “mouse” (10 units)')
    expect(text.methods).toContain(
      'In lme4 notation the model was neurite_length_um ~ treatment + (1|mouse).',
    )
    expect(text.methods).toContain(
      'For NW-117 − vehicle, the design effect was 17.5 and the effective n 23.5.',
    )
  })
})

describe('report text of an engine-0.1 result', () => {
  it('reads word for word as the text Nestwise 0.1 wrote for it', () => {
    // Source: reportText of commit ca30a43 (before engine 0.2) run on this fixture; a stored report
    // of an old version must not change its words.
    expect(reportText(context)).toEqual({
      methods:
        "“neurite_length_um” was compared between the conditions of “treatment” (vehicle and NW-117; reference vehicle) with a linear mixed model fitted by REML, with a random intercept for “mouse” (10 units). Degrees of freedom used the Satterthwaite approximation. As a check, a Student's t-test was run on the means of the 10 units of “mouse”. A hierarchical bootstrap (resampling units at every level, 2000 resamples, seed “demo”) gave percentile 95% intervals. The independent unit is the “mouse”: n = 5 (vehicle), 5 (NW-117) units of “mouse”, with 412 observations in all (design effect 17.5, effective n 23.5). Analyses were run in Nestwise 0.1.0 (statistics engine 0.1.0).",
      results:
        'Difference in “neurite_length_um”, NW-117 minus vehicle: 7.62 (95% CI [-21.1, 36.3]; t(8.1) = 0.612, p = 0.56; n = 5 vs 5 units of “mouse”); linear mixed model, Satterthwaite df.',
    })
  })
})
