import { describe, expect, it } from 'vitest'
import { EngineInputError } from './engine-input-error'
import { fitNestedReml } from './fit-nested-reml'
import { dyestuff } from './fixtures/dyestuff'
import { dyestuff2 } from './fixtures/dyestuff2'
import { machines } from './fixtures/machines'
import { nestedColumnsFromTable } from './fixtures/nested-columns-from-table'
import { pastes } from './fixtures/pastes'
import { prepareNestedDesign } from './prepare-nested-design'
import type { NestedColumns } from './types'

const fit = (cols: NestedColumns, reference?: Record<string, string>) =>
  fitNestedReml(prepareNestedDesign(cols, { reference }))
const variance = (f: ReturnType<typeof fit>, level: string) =>
  f.components.find((c) => c.level === level)!.variance

describe('fitNestedReml', () => {
  it('reproduces the published Dyestuff REML fit', () => {
    const f = fit(nestedColumnsFromTable(dyestuff, 'Yield', ['Batch']))
    // Dyestuff, lme4 1.1-31 lmer(Yield ~ 1 + (1|Batch)): σ_batch² 1764.05, σ² 2451.25 (= MSW),
    // intercept 1527.5 (SE 19.38), REML criterion 319.6543.
    expect(variance(f, 'Batch')).toBeCloseTo(1764.05, 5)
    expect(f.sigma2).toBeCloseTo(2451.25, 5)
    expect(f.beta[0]).toBeCloseTo(1527.5, 9)
    expect(Math.sqrt(f.vcovBeta[0][0])).toBeCloseTo(19.3834, 4)
    expect(f.remlCriterion).toBeCloseTo(319.6543, 4)
    expect(f.singular).toBe(false)
    expect(f.converged).toBe(true)
    // ICC 0.4185: Dyestuff, from the components above (lme4 VarCorr).
    expect(variance(f, 'Batch') / (variance(f, 'Batch') + f.sigma2)).toBeCloseTo(0.4185, 4)
  })

  it('finds the Dyestuff2 boundary exactly', () => {
    const f = fit(nestedColumnsFromTable(dyestuff2, 'Yield', ['Batch']))
    // Dyestuff2, lme4 1.1-31: σ_batch² = 0 (singular), σ² 13.806, intercept 5.6656 with SE 0.6784,
    // the naive SE sd/√30 at the boundary.
    expect(variance(f, 'Batch')).toBe(0)
    expect(f.singular).toBe(true)
    expect(f.sigma2).toBeCloseTo(13.80631, 5)
    expect(f.beta[0]).toBeCloseTo(5.6656, 4)
    expect(Math.sqrt(f.vcovBeta[0][0])).toBeCloseTo(0.6784, 4)
    const y = dyestuff2.Yield
    const mean = y.reduce((s, v) => s + v, 0) / y.length
    const sd = Math.sqrt(y.reduce((s, v) => s + (v - mean) ** 2, 0) / (y.length - 1))
    expect(Math.sqrt(f.vcovBeta[0][0])).toBeCloseTo(sd / Math.sqrt(y.length), 10)
  })

  it('fits the two-level Pastes design', () => {
    const f = fit(nestedColumnsFromTable(pastes, 'strength', ['batch', 'cask']))
    // Pastes, lme4 1.1-31 lmer(strength ~ 1 + (1|batch/cask)): σ_batch² 1.657, σ_cask:batch² 8.434,
    // σ² 0.678, intercept 60.0533 (SE 0.6769), REML criterion 246.99.
    expect(variance(f, 'batch')).toBeCloseTo(1.657, 3)
    expect(variance(f, 'cask')).toBeCloseTo(8.434, 3)
    expect(f.sigma2).toBeCloseTo(0.678, 3)
    expect(f.beta[0]).toBeCloseTo(60.0533, 4)
    expect(Math.sqrt(f.vcovBeta[0][0])).toBeCloseTo(0.6769, 4)
    expect(f.remlCriterion).toBeCloseTo(246.9907, 3)
  })

  it('fits a condition that varies within workers (Machines)', () => {
    const f = fit(nestedColumnsFromTable(machines, 'score', ['Worker'], 'Machine'))
    // Machines (nlme), lme4 1.1-31 lmer(score ~ Machine + (1|Worker) + (1|Worker:Machine)):
    // σ_worker² 22.858, σ_worker:machine² 13.909, σ² 0.925, fixed effects 52.356, 7.967, 13.917.
    expect(f.components.map((c) => c.level)).toEqual(['Worker', 'Worker:Machine', 'residual'])
    expect(variance(f, 'Worker')).toBeCloseTo(22.858, 2)
    expect(variance(f, 'Worker:Machine')).toBeCloseTo(13.909, 2)
    expect(f.sigma2).toBeCloseTo(0.925, 3)
    expect(f.beta[0]).toBeCloseTo(52.3556, 4)
    expect(f.beta[1]).toBeCloseTo(7.9667, 4)
    expect(f.beta[2]).toBeCloseTo(13.9167, 4)
  })

  describe('invariances (common practice, no source)', () => {
    const base = () => nestedColumnsFromTable(pastes, 'strength', ['batch', 'cask'])
    const reference = fit(base())

    it('does not depend on row order', () => {
      const n = pastes.strength.length
      const order = Array.from({ length: n }, (_, i) => (i * 37) % n)
      const shuffled = Object.fromEntries(Object.entries(pastes).map(([k, v]) => [k, order.map((i) => v[i])]))
      const f = fit(nestedColumnsFromTable(shuffled, 'strength', ['batch', 'cask']))
      f.components.forEach((c, i) => expect(c.variance).toBeCloseTo(reference.components[i].variance, 9))
      expect(f.beta[0]).toBeCloseTo(reference.beta[0], 10)
      expect(f.remlCriterion).toBeCloseTo(reference.remlCriterion, 9)
    })

    it('does not depend on unit labels', () => {
      const relabelled = {
        ...pastes,
        batch: pastes.batch.map((b) => `lot-${'JIHGFEDCBA'['ABCDEFGHIJ'.indexOf(b)]}`),
      }
      const f = fit(nestedColumnsFromTable(relabelled, 'strength', ['batch', 'cask']))
      f.components.forEach((c, i) => expect(c.variance).toBeCloseTo(reference.components[i].variance, 9))
    })

    it('moves only the means when a constant is added to the response', () => {
      const cols = nestedColumnsFromTable(machines, 'score', ['Worker'], 'Machine')
      const before = fitNestedReml(prepareNestedDesign(cols))
      cols.response = cols.response.map((v) => v + 1e4)
      const after = fitNestedReml(prepareNestedDesign(cols))
      after.components.forEach((c, i) => expect(c.variance / before.components[i].variance).toBeCloseTo(1, 8))
      expect(after.beta[0] - before.beta[0]).toBeCloseTo(1e4, 7)
      expect(after.beta[1]).toBeCloseTo(before.beta[1], 7)
      expect(after.vcovBeta[1][1] / before.vcovBeta[1][1]).toBeCloseTo(1, 8)
    })
  })

  describe('guards', () => {
    it('rejects a response with no variation', () => {
      const cols = nestedColumnsFromTable({ g: ['a', 'a', 'b', 'b'], y: [3, 3, 3, 3] }, 'y', ['g'])
      expect(() => fitNestedReml(prepareNestedDesign(cols))).toThrow(EngineInputError)
      expect(() => fitNestedReml(prepareNestedDesign(cols))).toThrow(/does not vary within conditions/)
    })
    it('rejects a response explained entirely by the condition', () => {
      const t = {
        g: ['a', 'a', 'b', 'b', 'c', 'c'],
        d: ['x', 'y', 'x', 'y', 'x', 'y'],
        y: [1, 2, 1, 2, 1, 2],
      }
      expect(() => fit(nestedColumnsFromTable(t, 'y', ['g'], 'd'))).toThrow(/does not vary within conditions/)
    })
  })
})
