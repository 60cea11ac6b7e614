import { describe, expect, it } from 'vitest'
import { EngineInputError } from './engine-input-error'
import { fitNestedReml } from './fit-nested-reml'
import { dyestuff } from './fixtures/dyestuff'
import { dyestuff2 } from './fixtures/dyestuff2'
import { machines } from './fixtures/machines'
import { nestedColumnsFromTable } from './fixtures/nested-columns-from-table'
import { pastes } from './fixtures/pastes'
import { prepareNestedDesign } from './prepare-nested-design'
import { satterthwaiteContrast } from './satterthwaite-contrast'

const setup = (...args: Parameters<typeof nestedColumnsFromTable>) => {
  const design = prepareNestedDesign(nestedColumnsFromTable(...args))
  return { design, fit: fitNestedReml(design) }
}

describe('satterthwaiteContrast', () => {
  const m = setup(machines, 'score', ['Worker'], 'Machine')

  it('matches lmerTest on a within-worker machine contrast (Machines)', () => {
    // Machines (nlme), lmerTest 3.1-3 contest(m, c(0, 1, 0), joint = FALSE):
    // estimate 7.966667, SE 2.176975, df 10.0 (balanced: exact 10), t 3.659511, p 0.004392633.
    const c = satterthwaiteContrast(m.design, m.fit, [0, 1, 0])
    expect(c.estimate).toBeCloseTo(7.966667, 6)
    expect(c.se).toBeCloseTo(2.176975, 5)
    expect(c.df).toBeCloseTo(10, 5)
    expect(c.t).toBeCloseTo(3.659511, 5)
    expect(c.p).toBeCloseTo(0.004392633, 8)
  })

  it('matches lmerTest on a mean (Machines)', () => {
    // lmerTest 3.1-3 contest(m, c(1, 0, 0)): estimate 52.35556, SE 2.485830, df 8.521698, p 1.198211e-08.
    const c = satterthwaiteContrast(m.design, m.fit, [1, 0, 0])
    expect(c.se).toBeCloseTo(2.48583, 5)
    expect(c.df).toBeCloseTo(8.521698, 5)
    expect(c.p / 1.198211e-8).toBeCloseTo(1, 5)
  })

  it('gives the between-unit df for an intercept-only model', () => {
    // Dyestuff, lmerTest 3.1-3: intercept df 5.0 (6 batches − 1), SE 19.38341, p 6.234476e-09.
    const d = setup(dyestuff, 'Yield', ['Batch'])
    const c = satterthwaiteContrast(d.design, d.fit, [1])
    expect(c.df).toBeCloseTo(5, 5)
    expect(c.p / 6.234476e-9).toBeCloseTo(1, 5)
    // Pastes, lmerTest 3.1-3: intercept SE 0.6768702, df 9.0 (10 batches − 1), t 88.72208.
    const p = setup(pastes, 'strength', ['batch', 'cask'])
    const c2 = satterthwaiteContrast(p.design, p.fit, [1])
    expect(c2.se).toBeCloseTo(0.6768702, 6)
    expect(c2.df).toBeCloseTo(9, 5)
    expect(c2.t).toBeCloseTo(88.72208, 4)
  })

  it('drops a variance estimated at 0 (Dyestuff2 boundary)', () => {
    // Dyestuff2, lmerTest 3.1-3 contest(): intercept SE 0.6783880, df 29 (= n − 1 at the boundary),
    // p 3.318293e-09.
    const d = setup(dyestuff2, 'Yield', ['Batch'])
    const c = satterthwaiteContrast(d.design, d.fit, [1])
    expect(c.se).toBeCloseTo(0.678388, 6)
    expect(c.df).toBeCloseTo(29, 6)
    expect(c.p / 3.318293e-9).toBeCloseTo(1, 5)
  })

  it('does not depend on row order (common practice, no source)', () => {
    const n = machines.score.length
    const order = Array.from({ length: n }, (_, i) => (i * 17) % n)
    const shuffled = Object.fromEntries(Object.entries(machines).map(([k, v]) => [k, order.map((i) => v[i])]))
    const s = setup(shuffled, 'score', ['Worker'], 'Machine')
    // Labels appear in another order after shuffling: fix the reference so the coding matches.
    const s2 = {
      design: prepareNestedDesign(nestedColumnsFromTable(shuffled, 'score', ['Worker'], 'Machine'), {
        reference: { Machine: 'A' },
      }),
    }
    const fit2 = fitNestedReml(s2.design)
    const iB = s2.design.factors[0].labels.indexOf('B')
    const a = satterthwaiteContrast(m.design, m.fit, [1, 1, 0])
    const b = satterthwaiteContrast(
      s2.design,
      fit2,
      fit2.beta.map((_, i) => (i === 0 || i === iB ? 1 : 0)),
    )
    expect(b.estimate).toBeCloseTo(a.estimate, 9)
    expect(b.df).toBeCloseTo(a.df, 6)
    expect(s.fit.remlCriterion).toBeCloseTo(m.fit.remlCriterion, 9)
  })

  it('guards its contrast vector', () => {
    expect(() => satterthwaiteContrast(m.design, m.fit, [1, 0])).toThrow(EngineInputError)
    expect(() => satterthwaiteContrast(m.design, m.fit, [1, 0])).toThrow(/needs 3 finite coefficients/)
    expect(() => satterthwaiteContrast(m.design, m.fit, [1, NaN, 0])).toThrow(/finite/)
    expect(() => satterthwaiteContrast(m.design, m.fit, [0, 0, 0])).toThrow(/at least one non-zero/)
  })
})
