import { describe, expect, it } from 'vitest'
import { nestedColumnsFromTable } from '../stats/fixtures/nested-columns-from-table'
import { prepareNestedDesign } from '../stats/prepare-nested-design'
import { compareUnitMeans } from './compare-unit-means'

/** Invented: nine mice, genotype × treatment between mice, five neurons each; KO:drug has a single mouse. */
function table() {
  const mice: [string, string, string][] = [
    ['m1', 'WT', 'veh'],
    ['m2', 'WT', 'veh'],
    ['m3', 'WT', 'drug'],
    ['m4', 'WT', 'drug'],
    ['m5', 'KO', 'veh'],
    ['m6', 'KO', 'veh'],
    ['m7', 'KO', 'drug'],
    ['m8', 'WT', 'veh'],
    ['m9', 'KO', 'veh'],
  ]
  const t = { animal: [] as string[], genotype: [] as string[], treatment: [] as string[], y: [] as number[] }
  let k = 0
  for (const [m, g, tr] of mice) {
    for (let i = 0; i < 5; i++) {
      t.animal.push(m)
      t.genotype.push(g)
      t.treatment.push(tr)
      t.y.push(
        10 + (g === 'KO' ? 1 : 0) + (tr === 'drug' ? 2 : 0) + Math.sin(k++) * 2 + (m.charCodeAt(1) % 3),
      )
    }
  }
  return t
}

describe('compareUnitMeans with two factors', () => {
  it('is a type III two-way ANOVA on the unit means, also with a single unit in one cell', () => {
    const design = prepareNestedDesign(
      nestedColumnsFromTable(table(), 'y', ['animal'], ['genotype', 'treatment']),
    )
    const { test, problem } = compareUnitMeans(design, null)
    expect(problem).toBeNull()
    if (test?.method !== 'two-way-anova') throw new Error('expected a two-way ANOVA')
    expect(test).toMatchObject({ level: 'animal', nUnits: 9 })
    // R 4.x on the nine mouse means: options(contrasts = c("contr.sum", "contr.poly"));
    // drop1(lm(y ~ g * t), . ~ ., test = "F"): F 2.4389 / 5.1561 / 3.2163 on 1 and 5 df, p 0.17911 / 0.07238 / 0.13288.
    expect(test.terms.map((term) => [term.term, term.df1, term.df2])).toEqual([
      ['genotype', 1, 5],
      ['treatment', 1, 5],
      ['genotype:treatment', 1, 5],
    ])
    const f = test.terms.map((term) => term.f)
    expect(f[0]).toBeCloseTo(2.4389, 4)
    expect(f[1]).toBeCloseTo(5.1561, 4)
    expect(f[2]).toBeCloseTo(3.2163, 4)
    expect(test.terms[1].p).toBeCloseTo(0.07238, 5)
  })

  it('says why there is no test when every unit spans several cells', () => {
    const t = table()
    const mixed = { ...t, treatment: t.treatment.map((_, i) => (i % 2 ? 'veh' : 'drug')) }
    const design = prepareNestedDesign(
      nestedColumnsFromTable(mixed, 'y', ['animal'], ['genotype', 'treatment']),
    )
    expect(compareUnitMeans(design, null)).toEqual({
      test: null,
      problem:
        'the combination of conditions varies inside every unit, so no unit carries a single combination of conditions',
    })
  })
})
