import { describe, expect, it } from 'vitest'
import type { AnalysisSettings } from '../schemas/analyses'
import type { AnalysisResult, MixedModelContrast } from '../schemas/analysis-result'
import { contrastInterval } from './contrast-interval'
import demo from './fixtures/single-lab-demo.json'
import { methodsParagraph, reportText, resultsSentence } from './report-text'

// Fixture: the engine's stored result for the seeded single-lab demo analysis (5 mice per arm).
const result = demo.result as AnalysisResult
const settings = demo.settings as AnalysisSettings
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
