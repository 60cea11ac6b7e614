import { describe, expect, it } from 'vitest'
import { ApiError } from '@/api/http'
import { badFileWhere } from './bad-file'
import { moveItem } from './move-item'
import {
  labelList,
  missingValueWords,
  operatorsFor,
  placementWords,
  ruleWords,
  unitWords,
} from './nesting-words'
import { sameTagging } from './same-tagging'
import { unitAdequacy } from './unit-badge'

describe('moveItem', () => {
  it('moves one item and keeps the others in order', () => {
    expect(moveItem(['lab', 'mouse', 'coverslip'], 2, 0)).toEqual(['coverslip', 'lab', 'mouse'])
    expect(moveItem(['lab', 'mouse'], 0, 1)).toEqual(['mouse', 'lab'])
  })

  it('clamps the target and leaves the input untouched', () => {
    const levels = ['lab', 'mouse']
    expect(moveItem(levels, 0, 9)).toEqual(['mouse', 'lab'])
    expect(moveItem(levels, 5, 0)).toEqual(['lab', 'mouse'])
    expect(levels).toEqual(['lab', 'mouse'])
  })
})

describe('sameTagging', () => {
  const saved = {
    responseColumns: ['length', 'area'],
    conditionColumn: 'condition',
    levels: ['lab', 'mouse'],
  }

  it('ignores the order of responses but not of levels', () => {
    expect(sameTagging(saved, { ...saved, responseColumns: ['area', 'length'] })).toBe(true)
    expect(sameTagging(saved, { ...saved, levels: ['mouse', 'lab'] })).toBe(false)
    expect(sameTagging(saved, { ...saved, conditionColumn: null })).toBe(false)
  })
})

describe('placementWords', () => {
  it('says between which units the condition changes', () => {
    expect(placementWords('between-top', 'mouse', ['mouse'])).toBe('between “mouse” units')
    expect(placementWords('between-units', 'mouse', ['lab', 'mouse'])).toBe(
      'between “mouse” units, within “lab”',
    )
    expect(placementWords('within-innermost', null, ['lab', 'mouse'])).toBe('within each “mouse” unit')
    expect(placementWords(null, null, ['lab'])).toBeNull()
  })
})

describe('exclusion wording', () => {
  it('offers order comparisons only for number columns', () => {
    expect(operatorsFor('numeric')).toContain('gt')
    expect(operatorsFor('text')).toEqual(['eq', 'ne', 'missing'])
  })

  it('describes rules and units in words', () => {
    expect(ruleWords({ column: 'neurite_length_um', operator: 'gt', value: 150 })).toBe(
      '“neurite_length_um” is greater than 150',
    )
    expect(ruleWords({ column: 'mouse', operator: 'eq', value: 'm3' })).toBe('“mouse” equals “m3”')
    expect(ruleWords({ column: 'area', operator: 'missing', value: null })).toBe('“area” is missing')
    expect(
      unitWords([
        { column: 'lab', value: 'nimbus' },
        { column: 'mouse', value: 'm2' },
      ]),
    ).toBe('lab “nimbus” › mouse “m2”')
  })
})

describe('unitAdequacy', () => {
  it('follows the badge rule: under 3 too few, 3 to 5 thin, 6 or more the minimum for a variance estimate (common practice, no source)', () => {
    expect([0, 2, 3, 5, 6, 40].map(unitAdequacy)).toEqual([
      'too-few',
      'too-few',
      'thin',
      'thin',
      'adequate',
      'adequate',
    ])
  })
})

describe('badFileWhere', () => {
  const refusal = (details: unknown) =>
    new ApiError({ status: 400, code: 'INVALID_PAYLOAD', message: 'x', details })

  it('names row and column from the error details', () => {
    expect(
      badFileWhere(refusal({ reason: 'RAGGED_ROW', row: 14, columnNumber: 3, column: 'length' })),
    ).toEqual(['Row 14', 'Column 3 “length”'])
    expect(badFileWhere(refusal({ reason: 'BLANK_HEADER', columnNumber: 2 }))).toEqual(['Column 2'])
    expect(badFileWhere(refusal({ reason: 'EMPTY_FILE' }))).toEqual([])
    expect(badFileWhere(refusal(undefined))).toEqual([])
  })
})

describe('labelList', () => {
  it('says how many more labels there are than it lists', () => {
    expect(labelList(['M1', 'M2', 'M3', 'M4', 'M5'], 8)).toBe('M1, M2, M3, M4, M5 and 3 more')
    expect(labelList(['M1', 'M2'])).toBe('M1, M2')
  })
})

describe('missingValueWords', () => {
  it('says how many kept rows lack the response, so the counts add up', () => {
    expect(missingValueWords('soma_area_um2', 3)).toBe(
      '3 rows have no value in “soma_area_um2”: analyses of it leave those rows out, so they count fewer observations than this table.',
    )
    expect(missingValueWords('length', 1)).toMatch(
      /^1 row has no value in “length”: analyses of it leave that row out/,
    )
  })
})
