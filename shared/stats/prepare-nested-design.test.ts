import { describe, expect, it } from 'vitest'
import { EngineInputError } from './engine-input-error'
import { nestedColumnsFromTable } from './fixtures/nested-columns-from-table'
import { prepareNestedDesign } from './prepare-nested-design'

// A small invented table: 2 labs, animals "1"/"2" in each (labels repeat across labs).
const table = {
  lab: ['A', 'A', 'A', 'A', 'B', 'B', 'B', 'B', 'B'],
  animal: ['1', '1', '2', '2', '1', '1', '2', '2', '2'],
  dose: ['ctl', 'ctl', 'drug', 'drug', 'ctl', 'ctl', 'drug', 'drug', 'drug'],
  mixed: ['ctl', 'drug', 'ctl', 'drug', 'ctl', 'drug', 'ctl', 'drug', 'drug'],
  y: [1, 2, 3, 4, 5, 6, 7, 8, 9],
}

describe('prepareNestedDesign', () => {
  it('keys units by their full path and reports labels repeated under several parents', () => {
    // Common practice, no source: animal "1" of lab A is another animal than "1" of lab B.
    const d = prepareNestedDesign(nestedColumnsFromTable(table, 'y', ['lab', 'animal']))
    const animal = d.randomLevels[1]
    expect(animal.nUnits).toBe(4)
    expect(animal.unitLabels).toEqual(['A/1', 'A/2', 'B/1', 'B/2'])
    expect([...animal.parentOfUnit]).toEqual([0, 0, 1, 1])
    expect([...animal.unitOfObs]).toEqual([0, 0, 1, 1, 2, 2, 3, 3, 3])
    expect([...d.randomLevels[0].parentOfUnit]).toEqual([-1, -1])
    expect(d.implicitNesting).toEqual([{ level: 'animal', labels: ['1', '2'] }])
    expect(d.terms.map((t) => t.name)).toEqual(['lab', 'animal'])
  })

  it('drops rows with a missing response and counts them', () => {
    const cols = nestedColumnsFromTable(table, 'y', ['lab', 'animal'])
    cols.response[2] = NaN
    const d = prepareNestedDesign(cols)
    expect(d.nObs).toBe(8)
    expect(d.nDropped).toBe(1)
    expect([...d.randomLevels[1].unitOfObs]).toEqual([0, 0, 1, 2, 2, 3, 3, 3])
    expect([...d.y]).toEqual([1, 2, 4, 5, 6, 7, 8, 9])
  })

  it('adds lab × condition when the condition varies between animals inside labs', () => {
    // The maximal nested model (Barr et al. 2013): y ~ dose + (1|lab) + (1|lab:dose) + (1|lab:animal).
    const t = {
      lab: ['A', 'A', 'A', 'A', 'A', 'A', 'A', 'A', 'B', 'B', 'B', 'B', 'B', 'B', 'B', 'B'],
      animal: ['1', '1', '2', '2', '3', '3', '4', '4', '1', '1', '2', '2', '3', '3', '4', '4'],
      dose: ['c', 'c', 'c', 'c', 'd', 'd', 'd', 'd', 'c', 'c', 'd', 'd', 'c', 'c', 'd', 'd'],
      y: [1, 2, 2, 3, 4, 5, 5, 4, 3, 4, 6, 7, 2, 3, 6, 8],
    }
    const d = prepareNestedDesign(nestedColumnsFromTable(t, 'y', ['lab', 'animal'], 'dose'))
    expect(d.cellLevel).toBe(1)
    expect(d.factors[0].carrier).toBe(1)
    expect(d.terms.map((term) => [term.name, term.nGroups])).toEqual([
      ['lab', 2],
      ['lab:dose', 4],
      ['animal', 8],
    ])
    expect(d.skippedTerms).toEqual([])
    expect(d.factors[0].labels).toEqual(['c', 'd'])
  })

  it('adds unit × condition at every level where the condition varies (within animals)', () => {
    // lme4 formula for this design: y ~ mixed + (1|lab) + (1|lab:mixed) + (1|lab:animal) + (1|lab:animal:mixed)
    const d = prepareNestedDesign(nestedColumnsFromTable(table, 'y', ['lab', 'animal'], 'mixed'))
    expect(d.cellLevel).toBe(-1)
    expect(d.terms.map((t) => [t.name, t.nGroups])).toEqual([
      ['lab', 2],
      ['lab:mixed', 4],
      ['animal', 4],
      ['animal:mixed', 8],
    ])
    expect(d.terms[3].grouping).toEqual(['lab', 'animal', 'mixed'])
  })

  it('leaves out a level × condition term whose groups are the next level or the observations', () => {
    const t = {
      lab: ['A', 'A', 'B', 'B', 'C', 'C'],
      dose: ['c', 'd', 'c', 'd', 'c', 'd'],
      y: [1, 2, 3, 5, 4, 4],
    }
    const d = prepareNestedDesign(nestedColumnsFromTable(t, 'y', ['lab'], 'dose'))
    expect(d.terms.map((term) => term.name)).toEqual(['lab'])
    expect(d.skippedTerms).toEqual([{ name: 'lab:dose', sameAs: 'the observations (the residual)' }])
    // One animal per lab and dose: lab:dose would be the animals themselves.
    const one = {
      lab: ['A', 'A', 'A', 'A', 'B', 'B', 'B', 'B'],
      animal: ['1', '1', '2', '2', '1', '1', '2', '2'],
      dose: ['c', 'c', 'd', 'd', 'c', 'c', 'd', 'd'],
      y: [1, 2, 3, 4, 5, 6, 7, 9],
    }
    const e = prepareNestedDesign(nestedColumnsFromTable(one, 'y', ['lab', 'animal'], 'dose'))
    expect(e.terms.map((term) => term.name)).toEqual(['lab', 'animal'])
    expect(e.skippedTerms).toEqual([{ name: 'lab:dose', sameAs: 'animal' }])
  })

  it('reduces to the earlier model when the condition varies within no level (common practice, no source)', () => {
    const perLab = { ...table, dose: ['ctl', 'ctl', 'ctl', 'ctl', 'drug', 'drug', 'drug', 'drug', 'drug'] }
    const three = {
      lab: [...perLab.lab, 'C', 'C', 'C', 'D', 'D'],
      animal: [...perLab.animal, '1', '2', '2', '1', '2'],
      dose: [...perLab.dose, 'ctl', 'ctl', 'ctl', 'drug', 'drug'],
      y: [...perLab.y, 3, 2, 5, 6, 8],
    }
    const d = prepareNestedDesign(nestedColumnsFromTable(three, 'y', ['lab', 'animal'], 'dose'))
    expect(d.factors[0].carrier).toBe(0)
    expect(d.terms.map((t) => t.name)).toEqual(['lab', 'animal'])
    expect(d.skippedTerms).toEqual([])
  })

  it('crosses two factors and adds a term for each and for their combination', () => {
    // Oats-like: block > (variety × nitro), one plot per block and variety: lme4 formula
    // y ~ variety * nitro + (1|block) + (1|block:variety) + (1|block:nitro); block:variety:nitro is the residual.
    const t = {
      block: ['I', 'I', 'I', 'I', 'II', 'II', 'II', 'II', 'III', 'III', 'III', 'III'],
      variety: ['v', 'v', 'w', 'w', 'v', 'v', 'w', 'w', 'v', 'v', 'w', 'w'],
      nitro: ['0', '1', '0', '1', '0', '1', '0', '1', '0', '1', '0', '1'],
      y: [1, 3, 2, 5, 2, 4, 2, 6, 1, 4, 3, 6],
    }
    const d = prepareNestedDesign(nestedColumnsFromTable(t, 'y', ['block'], ['variety', 'nitro']))
    expect(d.terms.map((term) => term.name)).toEqual(['block', 'block:variety', 'block:nitro'])
    expect(d.skippedTerms).toEqual([
      { name: 'block:variety:nitro', sameAs: 'the observations (the residual)' },
    ])
    expect(d.cells.labels).toEqual(['v:0', 'v:1', 'w:0', 'w:1'])
    expect(d.fixed.columns.map((c) => `${c.term}|${c.level}`)).toEqual([
      '(intercept)|null',
      'variety|w',
      'nitro|1',
      'variety:nitro|w:1',
    ])
  })

  it('takes covariates and finds the level they are measured at', () => {
    const t = { ...table, weight: [20, 20, 22, 22, 19, 19, 25, 25, 25], soma: [9, 8, 7, 9, 8, 6, 9, NaN, 7] }
    const d = prepareNestedDesign(
      nestedColumnsFromTable(t, 'y', ['lab', 'animal'], 'dose', ['weight', 'soma']),
    )
    expect(d.nObs).toBe(8)
    expect(d.nDropped).toBe(1)
    expect(d.covariates.map((c) => [c.name, c.constantWithin])).toEqual([
      ['weight', 1],
      ['soma', -1],
    ])
    expect(d.fixed.columns.map((c) => c.term)).toEqual(['(intercept)', 'dose', 'weight', 'soma'])
  })

  it('puts the chosen reference first and keeps the factor order for the others', () => {
    const t = { ...table, dose: ['b', 'b', 'c', 'c', 'a', 'a', 'b', 'c', 'a'] }
    const cols = nestedColumnsFromTable(t, 'y', ['lab'], 'dose')
    expect(prepareNestedDesign(cols).factors[0].labels).toEqual(['b', 'c', 'a'])
    const d = prepareNestedDesign(cols, { reference: { dose: 'a' } })
    expect(d.factors[0].labels).toEqual(['a', 'b', 'c'])
    expect(d.factors[0].reference).toBe('a')
    expect([...d.factors[0].codes]).toEqual([1, 1, 2, 2, 0, 0, 1, 2, 0])
  })

  it('numbers units by label order, not by row order', () => {
    const order = [8, 3, 5, 0, 7, 1, 6, 2, 4]
    const shuffled = Object.fromEntries(Object.entries(table).map(([k, v]) => [k, order.map((i) => v[i])]))
    const a = prepareNestedDesign(nestedColumnsFromTable(table, 'y', ['lab', 'animal']))
    const b = prepareNestedDesign(nestedColumnsFromTable(shuffled, 'y', ['lab', 'animal']))
    // Numbering follows the factor's label order, so give both the same label lists.
    expect(b.randomLevels[1].unitLabels).toEqual(['B/2', 'B/1', 'A/2', 'A/1'])
    const sameLabels = nestedColumnsFromTable(shuffled, 'y', ['lab', 'animal'])
    const reorder = (f: (typeof sameLabels.levels)[0], labels: string[]) => (
      (f.codes = f.codes.map((c) => labels.indexOf(f.labels[c]))),
      (f.labels = labels)
    )
    reorder(sameLabels.levels[0], ['A', 'B'])
    reorder(sameLabels.levels[1], ['1', '2'])
    const c = prepareNestedDesign(sameLabels)
    expect(c.randomLevels[1].unitLabels).toEqual(a.randomLevels[1].unitLabels)
    order.forEach((row, i) => expect(c.randomLevels[1].unitOfObs[i]).toBe(a.randomLevels[1].unitOfObs[row]))
  })

  describe('guards', () => {
    const cols = () => nestedColumnsFromTable(table, 'y', ['lab', 'animal'], 'dose')
    const fails = (mutate: (c: ReturnType<typeof cols>) => void, message: RegExp, opts = {}) => {
      const c = cols()
      mutate(c)
      expect(() => prepareNestedDesign(c, opts)).toThrow(EngineInputError)
      expect(() => prepareNestedDesign(c, opts)).toThrow(message)
    }
    it('needs a level', () => fails((c) => (c.levels = []), /At least one nesting level/))
    it('needs columns of equal length', () =>
      fails(
        (c) => (c.levels[0].codes = c.levels[0].codes.slice(1)),
        /"lab" has 8 values but the response has 9/,
      ))
    it('rejects an infinite response', () => fails((c) => (c.response[4] = Infinity), /infinite in row 5/))
    it('rejects codes outside the label list', () =>
      fails((c) => (c.levels[1].codes[0] = 7), /"animal" has no valid label in row 1/))
    it('needs two observations', () =>
      fails((c) => c.response.fill(NaN, 1), /Only 1 row\(s\) have a response value; at least 2 are needed/))
    it('needs two outermost units', () =>
      fails(
        (c) => (c.levels[0].codes = c.levels[0].codes.fill(0)),
        /"lab" has only 1 unit; at least 2 are needed/,
      ))
    it('rejects a level with one child per parent', () =>
      fails(
        (c) => (c.levels = [c.levels[0], { ...c.levels[0], name: 'lab2' }]),
        /Each "lab" holds a single "lab2"/,
      ))
    it('rejects a level with one observation per unit', () =>
      fails(
        (c) =>
          (c.levels[1] = {
            name: 'cell',
            labels: table.y.map(String),
            codes: Int32Array.from(table.y.keys()),
          }),
        /Each "cell" unit has a single observation/,
      ))
    it('rejects an unknown reference', () =>
      fails(() => {}, /reference level "placebo" does not occur/, { reference: { dose: 'placebo' } }))
    it('rejects a reference for a column that is not a condition', () =>
      fails(() => {}, /"genotype", which is not a condition column/, { reference: { genotype: 'WT' } }))
    it('needs two condition labels', () =>
      fails(
        (c) => (c.factors = [{ name: 'dose', labels: ['ctl'], codes: new Int32Array(9) }]),
        /only 1 label/,
      ))
    it('needs observations for every condition label', () =>
      fails(
        (c) => (c.factors![0].labels = [...c.factors![0].labels, 'unused']),
        /no observations with a response for: unused/,
      ))
    it('rejects a second factor that is constant', () =>
      fails(
        (c) => c.factors!.push({ name: 'batch', labels: ['b1'], codes: new Int32Array(9) }),
        /"batch" has only 1 label/,
      ))
    it('rejects a second factor confounded with the first', () =>
      fails(
        (c) => c.factors!.push({ ...c.factors![0], name: 'drug', labels: ['no', 'yes'] }),
        /"drug" is fully confounded with "dose"/,
      ))
    it('rejects two factors that are not fully crossed', () =>
      fails(
        (c) =>
          c.factors!.push({
            name: 'sex',
            labels: ['f', 'm'],
            codes: Int32Array.from([0, 0, 0, 0, 1, 1, 0, 0, 0]),
          }),
        /No observation has dose = "drug" together with sex = "m"/,
      ))
    it('rejects a factor that relabels a level', () =>
      fails(
        (c) => (c.factors = [{ name: 'site', labels: ['s1', 's2'], codes: c.levels[0].codes }]),
        /"site" groups the rows exactly as "lab" does/,
      ))
    it('rejects more than two factors', () =>
      fails(
        (c) => (c.factors = [c.factors![0], c.factors![0], c.factors![0]]),
        /At most 2 condition columns/,
      ))
    it('rejects a covariate that does not vary', () =>
      fails(
        (c) => (c.covariates = [{ name: 'age', values: new Float64Array(9).fill(12) }]),
        /The covariate "age" has the same value in every row/,
      ))
    it('rejects duplicate and reserved names', () => {
      fails((c) => (c.levels[1] = { ...c.levels[1], name: 'lab' }), /"lab" is used twice/)
      fails((c) => (c.levels[1] = { ...c.levels[1], name: 'residual' }), /named "residual"/)
    })
  })
})
