import { describe, expect, it } from 'vitest'
import { fitNestedReml } from './fit-nested-reml'
import { machines } from './fixtures/machines'
import { nestedColumnsFromTable } from './fixtures/nested-columns-from-table'
import { omnibusF } from './omnibus-f'
import { prepareNestedDesign } from './prepare-nested-design'

describe('omnibusF', () => {
  it('matches lmerTest anova() on Machines', () => {
    // Machines (nlme), lmerTest 3.1-3 anova(m): F 20.57608, NumDF 2, DenDF 10.0, p 0.00028555.
    const design = prepareNestedDesign(nestedColumnsFromTable(machines, 'score', ['Worker'], 'Machine'))
    const r = omnibusF(design, fitNestedReml(design))!
    expect(r.f).toBeCloseTo(20.57608, 4)
    expect(r.df1).toBe(2)
    expect(r.df2).toBeCloseTo(10, 5)
    expect(r.p / 0.0002855485).toBeCloseTo(1, 5)
  })

  it('is null with fewer than 3 conditions or none', () => {
    const two = { ...machines, Machine: machines.Machine.map((m) => (m === 'C' ? 'B' : m)) }
    const d2 = prepareNestedDesign(nestedColumnsFromTable(two, 'score', ['Worker'], 'Machine'))
    expect(omnibusF(d2, fitNestedReml(d2))).toBeNull()
    const d0 = prepareNestedDesign(nestedColumnsFromTable(machines, 'score', ['Worker']))
    expect(omnibusF(d0, fitNestedReml(d0))).toBeNull()
  })
})
