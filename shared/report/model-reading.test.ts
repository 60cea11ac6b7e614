import { describe, expect, it } from 'vitest'
import demo from './fixtures/single-lab-demo.json'
import type { AnalysisResult } from '../schemas/analysis-result'
import { twoFactorResult } from './fixtures/two-factor-result'
import { modelReading, skippedExplain } from './model-reading'

// Wording of the model's plain reading (our own words; no source).
describe('model reading', () => {
  it('reads a two-factor model with a covariate and level × condition terms in one sentence', () => {
    const text = modelReading({ ...twoFactorResult, model: twoFactorResult.model! })
    expect(text).toBe(
      'In words: “neurite_length_um” depends on genotype, treatment and their interaction, plus a straight-line slope in soma_area_um2; it varies at random between labs and between mice within a lab, and the effects of genotype, treatment and genotype × treatment differ at random from one lab to the next.',
    )
  })

  it('reads a model without fixed effects as one overall mean', () => {
    const old = demo.result as AnalysisResult
    const model = {
      formula: 'y ~ 1 + (1|mouse)',
      random: [{ name: 'mouse', level: 'mouse', factor: null, nGroups: 10 }],
      skipped: [],
    }
    expect(modelReading({ ...old, factors: [], covariates: [], model })).toBe(
      'In words: “neurite_length_um” has one overall mean; it varies at random between mice.',
    )
  })

  it('explains a skipped term by what it coincides with', () => {
    const model = twoFactorResult.model!
    expect(skippedExplain({ name: 'mouse:treatment', sameAs: 'residual' }, model)).toBe(
      '“mouse × treatment” is left out: its groups are exactly those of the single observations, so the data cannot tell the two apart.',
    )
    expect(skippedExplain({ name: 'lab:genotype', sameAs: 'lab:mouse' }, model)).toContain(
      'exactly those of “mouse”',
    )
  })
})
