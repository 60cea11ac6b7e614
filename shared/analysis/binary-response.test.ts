import { describe, expect, it } from 'vitest'
import { areYesNoLabels, defaultPositiveLabel, readBinaryResponse } from './binary-response'

// The product's own rules for reading a yes/no column (common practice, no source).

describe('areYesNoLabels', () => {
  it('takes two labels, and refuses a number with a note, one value or three', () => {
    expect(areYesNoLabels(['branched', 'unbranched'])).toBe(true)
    expect(areYesNoLabels(['5', 'n.d.'])).toBe(false)
    expect(areYesNoLabels(['n.d.', '2,5'])).toBe(false)
    expect(areYesNoLabels(['yes'])).toBe(false)
    expect(areYesNoLabels(['a', 'b', 'c'])).toBe(false)
  })
})

describe('defaultPositiveLabel', () => {
  it('counts 1 as yes in a 0/1 column, however the 1 is written', () => {
    expect(defaultPositiveLabel(['1', '0'])).toBe('1')
    expect(defaultPositiveLabel(['0', '1.0'])).toBe('1.0')
  })

  it('takes the one value that reads as yes', () => {
    expect(defaultPositiveLabel(['present', 'absent'])).toBe('present')
    expect(defaultPositiveLabel(['No', 'Yes'])).toBe('Yes')
    expect(defaultPositiveLabel(['-', '+'])).toBe('+')
    expect(defaultPositiveLabel(['FALSE', 'TRUE'])).toBe('TRUE')
  })

  it('otherwise takes the second value in sorted order', () => {
    expect(defaultPositiveLabel(['dim', 'bright'])).toBe('dim')
    expect(defaultPositiveLabel(['2', '10'])).toBe('10')
  })
})

describe('readBinaryResponse', () => {
  it('maps the two values to 1 (yes) and 0, missing to NaN', () => {
    const read = readBinaryResponse(['negative', 'positive'], Int32Array.of(0, 1, -1, 1), null)
    expect(read).toEqual({
      values: Float64Array.of(0, 1, NaN, 1),
      positive: 'positive',
      negative: 'negative',
    })
  })

  it('honours the value a person chose as yes', () => {
    const read = readBinaryResponse(['negative', 'positive'], Int32Array.of(0, 1, 1), 'negative')
    expect(read).toMatchObject({
      values: Float64Array.of(1, 0, 0),
      positive: 'negative',
      negative: 'positive',
    })
  })

  it('reads "1" and "1.0" as one value', () => {
    const read = readBinaryResponse(['0', '1', '1.0'], Int32Array.of(0, 1, 2), null)
    expect(read).toMatchObject({ values: Float64Array.of(0, 1, 1), positive: '1' })
  })

  it('names the row of a third value and the two seen before it', () => {
    const read = readBinaryResponse(['no', 'yes', 'maybe'], Int32Array.of(0, 1, 0, 2, 2), null)
    expect(read).toEqual({ problem: { kind: 'third-value', row: 3, value: 'maybe', values: ['no', 'yes'] } })
  })

  it('refuses a yes value the column does not hold', () => {
    const read = readBinaryResponse(['no', 'yes'], Int32Array.of(0, 1), 'YES')
    expect(read).toEqual({ problem: { kind: 'unknown-positive', positive: 'YES', values: ['no', 'yes'] } })
  })

  it('ignores labels no row uses', () => {
    const read = readBinaryResponse(['no', 'unused', 'yes'], Int32Array.of(0, 2, 2), null)
    expect(read).toMatchObject({ positive: 'yes', negative: 'no' })
  })
})
