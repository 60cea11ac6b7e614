import { describe, expect, it } from 'vitest'
import { cellMeans } from './cell-means'
import { EngineInputError } from './engine-input-error'
import { fitNestedReml } from './fit-nested-reml'
import { dyestuff } from './fixtures/dyestuff'
import { machines } from './fixtures/machines'
import { nestedColumnsFromTable } from './fixtures/nested-columns-from-table'
import { prepareNestedDesign } from './prepare-nested-design'

const setup = (...args: Parameters<typeof nestedColumnsFromTable>) => {
  const design = prepareNestedDesign(nestedColumnsFromTable(...args))
  return { design, fit: fitNestedReml(design) }
}

describe('cellMeans', () => {
  it('matches lmerTest contest() means and intervals on Machines', () => {
    // Machines (nlme), lmerTest 3.1-3 contest(m, rbind(c(1,0,0), c(1,1,0), c(1,0,1)), joint = FALSE):
    // means 52.35556 / 60.32222 / 66.27222, SE 2.485830, df 8.521698, 95% CI of A 46.68373 to 58.02738.
    const { design, fit } = setup(machines, 'score', ['Worker'], 'Machine')
    const r = cellMeans(design, fit)
    expect(r.map((c) => c.cell)).toEqual(['A', 'B', 'C'])
    expect(r.map((c) => +c.estimate.toFixed(5))).toEqual([52.35556, 60.32222, 66.27222])
    for (const c of r) {
      expect(c.se).toBeCloseTo(2.48583, 5)
      expect(c.df).toBeCloseTo(8.521698, 5)
    }
    expect(r[0].ci[0]).toBeCloseTo(46.68373, 4)
    expect(r[0].ci[1]).toBeCloseTo(58.02738, 4)
  })

  it('equals the SE of the mean of unit means on balanced data (Dyestuff)', () => {
    // Searle, Casella & McCulloch 1992 (balanced one-way): SE = √(MSB / (a n)) = √(11271.5 / 30);
    // lmerTest 3.1-3: 95% CI 1477.673 to 1577.327 with df 5.
    const { design, fit } = setup(dyestuff, 'Yield', ['Batch'])
    const [c] = cellMeans(design, fit)
    expect(c.cell).toBe('all')
    expect(c.se).toBeCloseTo(Math.sqrt(11271.5 / 30), 5)
    expect(c.ci[0]).toBeCloseTo(1477.673, 3)
    expect(c.ci[1]).toBeCloseTo(1577.327, 3)
    const c90 = cellMeans(design, fit, 0.9)[0]
    expect(c90.ci[1] - c90.ci[0]).toBeLessThan(c.ci[1] - c.ci[0])
  })

  it('guards the confidence level', () => {
    const { design, fit } = setup(dyestuff, 'Yield', ['Batch'])
    expect(() => cellMeans(design, fit, 1)).toThrow(EngineInputError)
    expect(() => cellMeans(design, fit, 0)).toThrow(/between 0 and 1/)
  })
})
