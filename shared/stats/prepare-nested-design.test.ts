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
    expect(d.levelNames).toEqual(['lab', 'animal'])
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

  it('finds the level that carries a between-animal condition and inserts nothing', () => {
    const d = prepareNestedDesign(nestedColumnsFromTable(table, 'y', ['lab', 'animal'], 'dose'))
    expect(d.conditionLevel).toBe('animal')
    expect(d.randomLevels.map((l) => l.name)).toEqual(['lab', 'animal'])
    expect(d.condition!.labels).toEqual(['ctl', 'drug'])
    expect([...d.condition!.codes]).toEqual([0, 0, 1, 1, 0, 0, 1, 1, 1])
  })

  it('inserts animal:condition when the condition varies inside animals', () => {
    // lme4 formula for this design: y ~ mixed + (1|lab) + (1|lab:animal) + (1|lab:animal:mixed)
    const d = prepareNestedDesign(nestedColumnsFromTable(table, 'y', ['lab', 'animal'], 'mixed'))
    expect(d.conditionLevel).toBeNull()
    const cell = d.randomLevels[2]
    expect(cell.name).toBe('animal:condition')
    expect(cell.inserted).toBe(true)
    expect(cell.unitLabels).toEqual([
      'A/1/ctl',
      'A/1/drug',
      'A/2/ctl',
      'A/2/drug',
      'B/1/ctl',
      'B/1/drug',
      'B/2/ctl',
      'B/2/drug',
    ])
    expect([...cell.parentOfUnit]).toEqual([0, 0, 1, 1, 2, 2, 3, 3])
    expect(cell.unitOfObs[8]).toBe(7)
  })

  it('leaves the unit × condition level out when each cell holds one observation', () => {
    const t = {
      lab: ['A', 'A', 'B', 'B', 'C', 'C'],
      dose: ['c', 'd', 'c', 'd', 'c', 'd'],
      y: [1, 2, 3, 5, 4, 4],
    }
    const d = prepareNestedDesign(nestedColumnsFromTable(t, 'y', ['lab'], 'dose'))
    expect(d.randomLevels.map((l) => l.name)).toEqual(['lab'])
    expect(d.conditionLevel).toBeNull()
  })

  it('puts the chosen reference first and keeps the factor order for the others', () => {
    const t = { ...table, dose: ['b', 'b', 'c', 'c', 'a', 'a', 'b', 'c', 'a'] }
    const cols = nestedColumnsFromTable(t, 'y', ['lab'], 'dose')
    expect(prepareNestedDesign(cols).condition!.labels).toEqual(['b', 'c', 'a'])
    const d = prepareNestedDesign(cols, { reference: 'a' })
    expect(d.condition!.labels).toEqual(['a', 'b', 'c'])
    expect(d.condition!.reference).toBe('a')
    expect([...d.condition!.codes]).toEqual([1, 1, 2, 2, 0, 0, 1, 2, 0])
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
      fails(() => {}, /reference condition "placebo" does not occur/, { reference: 'placebo' }))
    it('needs two condition labels', () =>
      fails(
        (c) => (c.condition = { name: 'dose', labels: ['ctl'], codes: new Int32Array(9) }),
        /only 1 label/,
      ))
    it('needs observations for every condition label', () =>
      fails(
        (c) => (c.condition!.labels = [...c.condition!.labels, 'unused']),
        /no observations with a response for: unused/,
      ))
    it('rejects duplicate and reserved names', () => {
      fails((c) => (c.levels[1] = { ...c.levels[1], name: 'lab' }), /"lab" is used twice/)
      fails((c) => (c.levels[1] = { ...c.levels[1], name: 'residual' }), /named "residual"/)
    })
  })
})
