import { describe, expect, it } from 'vitest'
import type { RandomTerm } from '../schemas/analysis-result'
import { componentLabel, factorWords, listWords, pluralOf, termLabel } from './words'

// Wording rules of the product (common practice, no source).
describe('plain words for result parts', () => {
  it('pluralises level names for running text', () => {
    expect(['lab', 'mouse', 'batch', 'colony', 'day', 'Mouse'].map(pluralOf)).toEqual([
      'labs',
      'mice',
      'batches',
      'colonies',
      'days',
      'Mice',
    ])
  })

  it('lists with commas and a final “and”', () => {
    expect(listWords([])).toBe('')
    expect(listWords(['a'])).toBe('a')
    expect(listWords(['a', 'b', 'c'])).toBe('a, b and c')
  })

  it('reads fixed terms and factor combinations aloud', () => {
    expect(termLabel('genotype:treatment')).toBe('genotype × treatment')
    expect(termLabel('(intercept)')).toBe('intercept')
    expect(factorWords('genotype:treatment')).toBe('genotype and treatment together')
  })

  it('labels level × condition components plainly, keeping a column name with ":" whole when the model says so', () => {
    const random: RandomTerm[] = [
      { name: 'lab', level: 'lab', factor: null, nGroups: 3 },
      { name: 'lab:dose:mg', level: 'lab', factor: 'dose:mg', nGroups: 9 },
      { name: 'lab:mouse', level: 'mouse', factor: null, nGroups: 12 },
    ]
    expect(componentLabel('residual')).toBe('within units (residual)')
    expect(componentLabel('lab:treatment')).toBe('lab × treatment')
    expect(componentLabel('Worker:condition')).toBe('Worker × condition')
    expect(componentLabel('mouse', random)).toBe('mouse')
    expect(componentLabel('lab:dose:mg', random)).toBe('lab × dose × mg')
  })
})
