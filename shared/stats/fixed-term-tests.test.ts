import { describe, expect, it } from 'vitest'
import { fitNestedReml } from './fit-nested-reml'
import { fixedCoefficients } from './fixed-coefficients'
import { fixedTermTests } from './fixed-term-tests'
import { machines } from './fixtures/machines'
import { nestedColumnsFromTable } from './fixtures/nested-columns-from-table'
import { prepareNestedDesign } from './prepare-nested-design'

describe('fixedTermTests', () => {
  it('matches lmerTest anova() on Machines (one term: type I rows)', () => {
    // Machines (nlme), lmerTest 3.1-3 anova(m): F 20.57608, NumDF 2, DenDF 10.0, p 0.00028555.
    const design = prepareNestedDesign(nestedColumnsFromTable(machines, 'score', ['Worker'], 'Machine'))
    const [r] = fixedTermTests(design, fitNestedReml(design))
    expect(r.term).toBe('Machine')
    expect(r.f).toBeCloseTo(20.57608, 4)
    expect(r.df1).toBe(2)
    expect(r.df2).toBeCloseTo(10, 5)
    expect(r.p / 0.0002855485).toBeCloseTo(1, 5)
  })

  it('gives F = t² for a one-df term (property of the F test, common practice)', () => {
    const two = { ...machines, Machine: machines.Machine.map((m) => (m === 'C' ? 'B' : m)) }
    const design = prepareNestedDesign(nestedColumnsFromTable(two, 'score', ['Worker'], 'Machine'))
    const fit = fitNestedReml(design)
    const [term] = fixedTermTests(design, fit)
    const coefficient = fixedCoefficients(design, fit)[1]
    expect(term.f / coefficient.t ** 2).toBeCloseTo(1, 10)
    expect(term.df2 / coefficient.df).toBeCloseTo(1, 10)
    expect(term.p / coefficient.p).toBeCloseTo(1, 10)
  })

  it('has no terms without a condition or covariate', () => {
    const design = prepareNestedDesign(nestedColumnsFromTable(machines, 'score', ['Worker']))
    expect(fixedTermTests(design, fitNestedReml(design))).toEqual([])
  })
})
