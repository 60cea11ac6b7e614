import { describe, expect, it } from 'vitest'
import { EngineInputError } from './engine-input-error'
import { fitNestedReml } from './fit-nested-reml'
import { machines } from './fixtures/machines'
import { nestedColumnsFromTable } from './fixtures/nested-columns-from-table'
import { prepareNestedDesign } from './prepare-nested-design'
import { satterthwaiteContrast } from './satterthwaite-contrast'
import { satterthwaiteF } from './satterthwaite-f'

describe('satterthwaiteF', () => {
  const design = prepareNestedDesign(nestedColumnsFromTable(machines, 'score', ['Worker'], 'Machine'))
  const fit = fitNestedReml(design)

  it('matches lmerTest anova() on Machines', () => {
    // Machines (nlme), lmerTest 3.1-3 anova(m) (rows [0 1 -0.5; 0 0 1]): F 20.57608, NumDF 2,
    // DenDF 10.0, p 0.00028555.
    const r = satterthwaiteF(design, fit, [
      [0, 1, -0.5],
      [0, 0, 1],
    ])
    expect(r.f).toBeCloseTo(20.57608, 4)
    expect(r.df1).toBe(2)
    expect(r.df2).toBeCloseTo(10, 5)
    expect(r.p / 0.0002855485).toBeCloseTo(1, 5)
  })

  it('does not depend on the basis of the rows for F', () => {
    // Common practice, no source: F is a property of the row space.
    const a = satterthwaiteF(design, fit, [
      [0, 1, 0],
      [0, 0, 1],
    ])
    const b = satterthwaiteF(design, fit, [
      [0, 1, -1],
      [0, 1, 1],
    ])
    expect(b.f).toBeCloseTo(a.f, 10)
  })

  it('reduces to t² with the t test df for one row', () => {
    // Kuznetsova et al. 2017, §3.3: with q = 1, F = t² and the df are those of the t test.
    const r = satterthwaiteF(design, fit, [[0, 1, 0]])
    const t = satterthwaiteContrast(design, fit, [0, 1, 0])
    expect(r.f).toBeCloseTo(t.t * t.t, 9)
    expect(r.df2).toBeCloseTo(t.df, 9)
    expect(r.p).toBeCloseTo(t.p, 9)
  })

  it('counts the rank, not the rows', () => {
    // Kuznetsova et al. 2017, §3.3: the numerator df is the rank of L C Lᵀ.
    const r = satterthwaiteF(design, fit, [
      [0, 1, 0],
      [0, 2, 0],
    ])
    expect(r.df1).toBe(1)
  })

  it('guards its rows', () => {
    expect(() => satterthwaiteF(design, fit, [])).toThrow(EngineInputError)
    expect(() => satterthwaiteF(design, fit, [[0, 1]])).toThrow(/needs 3 finite coefficients/)
    expect(() => satterthwaiteF(design, fit, [[0, 0, 0]])).toThrow(/rank 0/)
  })
})
