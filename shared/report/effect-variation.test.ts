import { describe, expect, it } from 'vitest'
import type { EffectVariation } from '../schemas/analysis-result'
import {
  effectVariationExplain,
  effectVariationSentence,
  fewUnitsCaution,
  warningsAbout,
} from './effect-variation'

// Invented level × condition terms; effectSd = √(2 · variance) as the result schema defines it.
const fourLabs: EffectVariation = {
  term: 'lab:treatment',
  level: 'lab',
  factor: 'treatment',
  variance: 48,
  effectSd: Math.sqrt(96),
  nUnits: 4,
}

describe('effect variation words', () => {
  it('says how much the effect differs, in the response’s unit when known', () => {
    expect(effectVariationSentence(fourLabs, 'µm')).toBe(
      'The effect of treatment differs between labs by about 9.80 µm (SD).',
    )
    expect(effectVariationSentence(fourLabs, null)).toBe(
      'The effect of treatment differs between labs by about 9.80 (SD).',
    )
    const both = { ...fourLabs, term: 'lab:genotype:treatment', factor: 'genotype:treatment' }
    expect(effectVariationSentence(both, null)).toMatch(
      /^The combined effect of genotype and treatment differs/,
    )
  })

  it('says a variance estimated as 0 as such, not as “about 0 µm”', () => {
    expect(effectVariationSentence({ ...fourLabs, variance: 0, effectSd: 0 }, 'µm')).toBe(
      'The effect of treatment shows no measurable difference between labs here (SD estimated as 0).',
    )
  })

  it('explains where the SD comes from', () => {
    expect(effectVariationExplain(fourLabs)).toContain('“lab × treatment” variance (48.0)')
  })

  it('cautions below 5 units that the comparison has about units − 1 df (issue 12)', () => {
    expect(fewUnitsCaution(fourLabs)).toContain('only 4 labs')
    expect(fewUnitsCaution(fourLabs)).toContain('about 3 degrees of freedom for a difference of two levels')
    expect(fewUnitsCaution({ ...fourLabs, nUnits: 5 })).toBeNull()
  })

  it('finds the engine’s warnings about this term, and only those', () => {
    // Shaped like engine 0.2's LEVEL_EFFECT_FEW_UNITS warning, which names the term in quotes.
    const about = (term: string) => ({
      code: 'LEVEL_EFFECT_FEW_UNITS',
      message: `The effect may differ from one lab to the next (the "${term}" variance), and only 4 lab units show how much.`,
    })
    const warnings = [
      about('lab:treatment'),
      about('lab:treatment:genotype'),
      { code: 'FEW_OUTER_UNITS', message: 'Only 4 labs.' },
    ]
    expect(warningsAbout(fourLabs, warnings)).toEqual([warnings[0]])
    expect(warningsAbout({ ...fourLabs, term: 'lab:treatment:genotype' }, warnings)).toEqual([warnings[1]])
  })

  it('leaves a warning that names several terms (such as a boundary fit) in the general list', () => {
    // Shaped like engine 0.2's BOUNDARY_FIT warning.
    const boundary = {
      code: 'BOUNDARY_FIT',
      message:
        'The variance between "lab:genotype", "lab:treatment" units was estimated as 0 (a boundary fit).',
    }
    expect(warningsAbout(fourLabs, [boundary], ['lab:genotype', 'lab:treatment'])).toEqual([])
    expect(warningsAbout(fourLabs, [boundary])).toEqual([boundary])
  })
})
