import { describe, expect, it } from 'vitest'
import { fitNestedReml } from './fit-nested-reml'
import { dyestuff } from './fixtures/dyestuff'
import { machines } from './fixtures/machines'
import { nestedColumnsFromTable } from './fixtures/nested-columns-from-table'
import { pairwiseContrasts } from './pairwise-contrasts'
import { prepareNestedDesign } from './prepare-nested-design'

describe('pairwiseContrasts', () => {
  it('matches lmerTest contrasts and R Holm on Machines', () => {
    // Machines (nlme), lmerTest 3.1-3 contest(): B−A 7.966667 (p 0.004392633), C−A 13.91667
    // (p 7.906483e-05), C−B 5.95 (p 0.02107914), SE 2.176975, df 10; Holm via R p.adjust.
    const design = prepareNestedDesign(nestedColumnsFromTable(machines, 'score', ['Worker'], 'Machine'))
    const r = pairwiseContrasts(design, fitNestedReml(design))
    expect(r.map((c) => `${c.a}-${c.b}`)).toEqual(['B-A', 'C-A', 'C-B'])
    expect(r.map((c) => +c.estimate.toFixed(5))).toEqual([7.96667, 13.91667, 5.95])
    expect(r[0].p).toBeCloseTo(0.004392633, 8)
    expect(r[1].p / 7.906483e-5).toBeCloseTo(1, 5)
    expect(r[2].p).toBeCloseTo(0.02107914, 7)
    expect(r[0].pHolm).toBeCloseTo(0.008785265, 8)
    expect(r[2].pHolm).toBeCloseTo(0.02107914, 7)
    for (const c of r) {
      expect(c.se).toBeCloseTo(2.176975, 5)
      expect(c.df).toBeCloseTo(10, 5)
    }
  })

  it('reads every comparison with a new reference against it', () => {
    // Common practice, no source: the reference moves to the front, differences flip sign.
    const design = prepareNestedDesign(nestedColumnsFromTable(machines, 'score', ['Worker'], 'Machine'), {
      reference: { Machine: 'C' },
    })
    const r = pairwiseContrasts(design, fitNestedReml(design))
    expect(r.map((c) => `${c.a}-${c.b}`)).toEqual(['A-C', 'B-C', 'B-A'])
    expect(r[0].estimate).toBeCloseTo(-13.91667, 5)
  })

  it('has no pairs without a condition', () => {
    const design = prepareNestedDesign(nestedColumnsFromTable(dyestuff, 'Yield', ['Batch']))
    expect(pairwiseContrasts(design, fitNestedReml(design))).toEqual([])
  })
})
