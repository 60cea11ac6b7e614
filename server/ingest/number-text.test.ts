import { describe, expect, it } from 'vitest'
import { isIntegerText, parseNumberText, trimCell } from './number-text'

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
})
