import { describe, expect, it } from 'vitest'
import { twoFactorResult } from './fixtures/two-factor-result'
import {
  coefficientRows,
  coefficientStatistic,
  simpleEffectRows,
  termRows,
  termStatistic,
} from './fixed-effect-rows'

// Invented two-factor fixture (shape only); the number wording is the product's (common practice, no source).
const model = twoFactorResult.comparisons.mixedModel!

describe('coefficient rows', () => {
  const rows = coefficientRows(model.coefficients!, twoFactorResult)
  const row = (term: string) => rows.find((r) => r.term === term)!

  it('reads each coefficient in treatment coding against the reference levels', () => {
    // Covariates are not centred in the coefficients (lme4's treatment coding), so the intercept is at 0.
    expect(row('intercept').reads).toBe('mean at genotype = WT, treatment = vehicle, soma_area_um2 = 0')
    expect(row('genotype')).toMatchObject({ level: 'KO', reads: 'KO − WT when treatment = vehicle' })
    expect(row('genotype × treatment')).toMatchObject({
      level: 'KO × KX-9',
      reads: 'extra difference for KO × KX-9 beyond the two effects alone',
    })
  })

  it('reads a covariate row as a slope per unit of the covariate', () => {
    expect(coefficientStatistic(model.coefficients!)).toBe('t')
    expect(row('soma_area_um2')).toMatchObject({
      ratio: '—',
      level: '—',
      reads: 'slope: change per 1 µm² of soma_area_um2',
      estimate: '0.212',
      df: '462.7',
      p: 'p < 0.001',
    })
    const plain = coefficientRows([{ ...model.coefficients![4], term: 'age' }], {
      covariates: [{ name: 'age', mean: 11, sd: 2.9, level: null }],
    })
    expect(plain[0].reads).toBe('slope: change per unit of age')
  })
})

describe('term rows', () => {
  it('gives F, both df with one decimal and p, and names the interaction', () => {
    expect(termStatistic(model.terms!)).toBe('F')
    expect(termRows(model.terms!)).toEqual([
      {
        id: 'genotype',
        term: 'genotype',
        statistic: 'F',
        value: '9.90',
        df1: '1',
        df2: '2.0',
        p: 'p = 0.086',
      },
      {
        id: 'treatment',
        term: 'treatment',
        statistic: 'F',
        value: '2.61',
        df1: '1',
        df2: '2.1',
        p: 'p = 0.24',
      },
      {
        id: 'genotype:treatment',
        term: 'genotype × treatment (interaction)',
        statistic: 'F',
        value: '1.04',
        df1: '1',
        df2: '6.1',
        p: 'p = 0.35',
      },
      {
        id: 'soma_area_um2',
        term: 'soma_area_um2',
        statistic: 'F',
        value: '46.8',
        df1: '1',
        df2: '462.7',
        p: 'p < 0.001',
      },
    ])
  })
})

describe('simple effect rows', () => {
  it('gives each factor within each level of the other, with its interval', () => {
    const rows = simpleEffectRows(model.simpleEffects!)
    expect(rows.map((r) => r.effect)).toEqual([
      'treatment within genotype = WT',
      'treatment within genotype = KO',
    ])
    expect(rows[0]).toMatchObject({ compared: 'KX-9 − vehicle', interval: '[-2.90, 29.7]', df: '5.2' })
    // Two levels: the F test equals t² and adds nothing, so it is not repeated.
    expect(rows[0].test).toBeNull()
  })

  it('shows the F test of a factor with three levels once, on its first row', () => {
    const [first] = model.simpleEffects!
    const three = { ...first, contrasts: [...first.contrasts, { ...first.contrasts[0], a: 'KX-10' }] }
    const rows = simpleEffectRows([three])
    expect(rows[0].test).toBe('F(1, 5.2) = 4.37, p = 0.090')
    expect(rows[1].test).toBeNull()
  })
})
