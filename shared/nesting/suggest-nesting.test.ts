import { describe, expect, it } from 'vitest'
import type { ColumnType } from '../schemas/datasets'
import { inventedNeuronRows, type InventedRow } from '../analysis/fixtures/invented-glmm-tables'
import { describeDesign } from './describe-design'
import { suggestNesting, type SuggestionColumn } from './suggest-nesting'
import type { CodedColumn } from './unit-paths'

function coded(name: string, values: (string | null)[]): CodedColumn {
  const labels: string[] = []
  const index = new Map<string, number>()
  const codes = new Int32Array(values.length)
  values.forEach((v, r) => {
    if (v === null) {
      codes[r] = -1
      return
    }
    let code = index.get(v)
    if (code === undefined) {
      code = labels.length
      index.set(v, code)
      labels.push(v)
    }
    codes[r] = code
  })
  return { name, codes, labels }
}

function column(name: string, type: ColumnType, values: (string | null)[]): SuggestionColumn {
  const c = coded(name, values)
  return {
    name,
    type,
    distinctCount: c.labels.length,
    missingCount: values.filter((v) => v === null).length,
    coded: c,
  }
}

/** Invented layout: `labs` labs, animals m1…mK reused in every lab, treatment per animal, n cells numbered 1…n. */
function betweenAnimals(labs = 3, animals = 4, cells = 10) {
  const rows: {
    lab: string
    city: string
    animal: string
    treatment: string
    cell: string
    length: string
  }[] = []
  let k = 0
  for (let l = 1; l <= labs; l++)
    for (let a = 1; a <= animals; a++)
      for (let c = 1; c <= cells; c++) {
        rows.push({
          lab: `Lab ${l}`,
          city: `City ${l}`,
          animal: `m${a}`,
          treatment: a % 2 ? 'vehicle' : 'NW-117',
          cell: String(c),
          length: (100 + ((k++ * 7919) % 97) / 3).toFixed(2),
        })
      }
  return rows
}

describe('suggestNesting', () => {
  it('finds lab › animal, the treatment between animals, the response, and reused animal labels', () => {
    const rows = betweenAnimals()
    const s = suggestNesting(rows.length, [
      column(
        'lab',
        'text',
        rows.map((r) => r.lab),
      ),
      column(
        'lab_city',
        'text',
        rows.map((r) => r.city),
      ),
      column(
        'animal',
        'text',
        rows.map((r) => r.animal),
      ),
      column(
        'treatment',
        'text',
        rows.map((r) => r.treatment),
      ),
      column(
        'cell',
        'integer',
        rows.map((r) => r.cell),
      ),
      { name: 'neurite_length', type: 'numeric', distinctCount: 97, missingCount: 0, coded: null },
    ])
    expect(s.levels.map((l) => l.column)).toEqual(['lab', 'animal'])
    expect(s.levels[0].unitCount).toBe(3)
    // 3 labs × 4 animals: the path keys m1 of Lab 1 apart from m1 of Lab 2.
    expect(s.levels[1]).toMatchObject({
      unitCount: 12,
      perParent: { min: 4, median: 4, max: 4 },
      reusedLabels: ['m1', 'm2', 'm3', 'm4'],
    })
    expect(s.aliases).toEqual([{ column: 'lab_city', sameAs: 'lab' }])
    expect(s.conditionColumn).toBe('treatment')
    expect(s.conditionLevel).toBe('animal')
    expect(s.conditionPlacement).toBe('between-units')
    expect(s.responseColumns).toEqual(['neurite_length'])
    expect(s.explanation.join(' ')).toContain('repeat under different “lab” units')
    expect(s.explanation.join(' ')).toContain('“cell” is different for almost every row')
  })

  it('places a condition given per coverslip inside every animal as between coverslips within animals', () => {
    const animal: string[] = []
    const coverslip: string[] = []
    const treatment: string[] = []
    for (let a = 1; a <= 5; a++)
      for (let c = 1; c <= 4; c++)
        for (let n = 0; n < 8; n++) {
          animal.push(`mouse ${a}`)
          coverslip.push(`cs${c}`)
          treatment.push(c <= 2 ? 'untreated' : 'treated')
        }
    const s = suggestNesting(animal.length, [
      column('animal', 'text', animal),
      column('coverslip', 'text', coverslip),
      column('treatment', 'text', treatment),
    ])
    expect(s.levels.map((l) => l.column)).toEqual(['animal', 'coverslip'])
    expect(s.conditionLevel).toBe('coverslip')
    expect(s.conditionPlacement).toBe('between-units')
    expect(s.explanation.join(' ')).toContain('every “animal” unit holds more than one')
    // Without telling names, the column that changes less often in file order is taken as the outer one.
    const plain = suggestNesting(animal.length, [column('b', 'text', coverslip), column('a', 'text', animal)])
    expect(plain.levels.map((l) => l.column)).toEqual(['a', 'b'])
  })

  it('says when each top-level unit has one condition, and when the condition changes inside the innermost unit', () => {
    const lab = ['A', 'A', 'A', 'B', 'B', 'B', 'C', 'C', 'C', 'D', 'D', 'D']
    const dose = ['low', 'low', 'low', 'high', 'high', 'high', 'low', 'low', 'low', 'high', 'high', 'high']
    const s = suggestNesting(lab.length, [column('site', 'text', lab), column('dose', 'text', dose)])
    expect(s.conditionPlacement).toBe('between-top')
    const mixed = suggestNesting(lab.length, [
      column('site', 'text', lab),
      column(
        'dose',
        'text',
        lab.map((_, r) => (r % 2 ? 'low' : 'high')),
      ),
    ])
    expect(mixed.conditionPlacement).toBe('within-innermost')
    expect(mixed.conditionLevel).toBeNull()
  })

  it('keeps integer measurements out of the levels but takes integer unit numbers', () => {
    const animal: string[] = []
    const branches: string[] = []
    for (let a = 1; a <= 6; a++) {
      for (let n = 0; n < 10; n++) {
        animal.push(String(a))
        branches.push(String((a * 7 + n * 3) % 11))
      }
    }
    const s = suggestNesting(animal.length, [
      column('animal', 'integer', animal),
      column('branch_count', 'integer', branches),
    ])
    expect(s.levels.map((l) => l.column)).toEqual(['animal'])
    expect(s.responseColumns).toEqual(['branch_count'])
  })

  it('explains when nothing groups the rows', () => {
    const s = suggestNesting(4, [
      { name: 'y', type: 'numeric', distinctCount: 4, missingCount: 0, coded: null },
    ])
    expect(s.levels).toEqual([])
    expect(s.explanation[0]).toContain('No column groups the rows')
  })
})

describe('suggestNesting with a yes/no written as text', () => {
  // Invented neurons in mice (see invented-glmm-tables.ts): "marker" is positive or negative.
  const rows = inventedNeuronRows()
  const text = (name: keyof InventedRow, values = rows.map((r) => String(r[name]))) =>
    column(name, 'text', values)
  const base = [text('lab'), text('mouse'), text('treatment'), text('neuron')]

  it('takes the one two-valued text column as the response when no numeric column can be', () => {
    const s = suggestNesting(rows.length, [...base, text('marker')])
    expect(s.responseColumns).toEqual(['marker'])
    expect(s.levels.map((l) => l.column)).toEqual(['lab', 'mouse'])
    expect(s.conditionColumn).toBe('treatment')
    expect(s.conditionLevel).toBe('mouse')
    expect(s.explanation.join(' ')).not.toContain('“marker” has')
    expect(s.explanation).toContain(
      `No numeric column can be the response; “marker” holds two values (“${rows[0].marker}”, “${rows[0].marker === 'positive' ? 'negative' : 'positive'}”), so it is suggested as the response, analysed as yes/no.`,
    )
  })

  it('leaves it alone when a numeric column can be the response', () => {
    const puncta = column(
      'puncta',
      'integer',
      rows.map((r) => String(r.puncta)),
    )
    const s = suggestNesting(rows.length, [...base, text('marker'), puncta])
    expect(s.responseColumns).toEqual(['puncta'])
  })

  it('leaves the choice to the person with two such columns, or one named like a unit', () => {
    const shape =
      text('marker').coded!.labels.length === 2 ? rows.map((_, i) => (i % 3 ? 'round' : 'flat')) : []
    const two = suggestNesting(rows.length, [
      ...base,
      text('marker'),
      text('soma_shape' as keyof InventedRow, shape),
    ])
    expect(two.responseColumns).toEqual([])
    const slice = suggestNesting(rows.length, [
      ...base,
      text(
        'slice' as keyof InventedRow,
        rows.map((r) => (r.marker === 'positive' ? 's1' : 's2')),
      ),
    ])
    expect(slice.responseColumns).toEqual([])
    expect(slice.levels.map((l) => l.column)).toContain('slice')
  })
})

describe('describeDesign', () => {
  it('counts units per arm at the level that carries the condition and reports the first missing label', () => {
    const rows = betweenAnimals(2, 4, 3)
    const animal = rows.map((r) => r.animal) as (string | null)[]
    animal[5] = null
    const d = describeDesign({
      rowCount: rows.length,
      levels: [
        coded(
          'lab',
          rows.map((r) => r.lab),
        ),
        coded('animal', animal),
      ],
      condition: coded(
        'treatment',
        rows.map((r) => r.treatment),
      ),
    })
    expect(d.levels.map((l) => l.unitCount)).toEqual([2, 8])
    expect(d.conditionLevel).toBe('animal')
    expect(d.arms).toEqual([
      { value: 'vehicle', unitCount: 4, observationCount: 12 },
      { value: 'NW-117', unitCount: 4, observationCount: 12 },
    ])
    expect(d.missingLabel).toEqual({ column: 'animal', rowIndex: 5 })
    expect(d.missingCondition).toBeNull()
  })
})
