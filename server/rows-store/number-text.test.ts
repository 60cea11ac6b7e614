import { describe, expect, it } from 'vitest'
import seedrandom from 'seedrandom'
import {
  isIntegerText,
  isNumberText,
  NumberShape,
  numberShapeOfBytes,
  parseNumberText,
  trimCell,
} from './number-text'

describe('number text', () => {
  it('reads decimal points, exponents and signs; refuses words, hex and Infinity', () => {
    expect(parseNumberText('12.5', '.')).toBe(12.5)
    expect(parseNumberText('-.5', '.')).toBe(-0.5)
    expect(parseNumberText('3.', '.')).toBe(3)
    expect(parseNumberText('1e-3', '.')).toBe(0.001)
    expect(parseNumberText('+4E2', '.')).toBe(400)
    for (const text of ['', 'abc', '0x1A', 'Infinity', '1,5', '1.2.3', '.', '1e', ' 12']) {
      expect(parseNumberText(text, '.'), text).toBeNaN()
    }
  })

  it('reads decimal commas only when the file uses them, and never a point there', () => {
    expect(parseNumberText('12,5', ',')).toBe(12.5)
    expect(parseNumberText('-0,25', ',')).toBe(-0.25)
    expect(parseNumberText('12.5', ',')).toBeNaN()
  })

  it('reports overflow as Infinity so the caller can name the cell', () => {
    expect(parseNumberText('1e400', '.')).toBe(Infinity)
    expect(parseNumberText('-1e400', '.')).toBe(-Infinity)
  })

  it('tells integers apart and trims spaces (including no-break spaces)', () => {
    expect(isIntegerText('007')).toBe(true)
    expect(isIntegerText('7.0')).toBe(false)
    expect(trimCell('\u00a0 12 ')).toBe('12')
    expect(trimCell('m 3')).toBe('m 3')
  })

  it('tells the shape of a number from its bytes as the regular expressions do from its text', () => {
    // Oracle: isIntegerText and isNumberText above (common practice, no source).
    const random = seedrandom('number-shape-bytes')
    const alphabet = ['0', '1', '9', '+', '-', '.', ',', 'e', 'E', ' ', 'x', 'µ']
    for (let trial = 0; trial < 20_000; trial++) {
      let text = ''
      for (let k = Math.floor(random() * 7); k > 0; k--)
        text += alphabet[Math.floor(random() * alphabet.length)]
      const bytes = Buffer.from(`[${text}]`)
      for (const mark of ['.', ','] as const) {
        const expected = isIntegerText(text)
          ? NumberShape.Integer
          : isNumberText(text, mark)
            ? NumberShape.Decimal
            : NumberShape.None
        expect(numberShapeOfBytes(bytes, 1, bytes.length - 1, mark), `${text} (${mark})`).toBe(expected)
      }
    }
  })
})
