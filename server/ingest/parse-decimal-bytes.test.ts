import seedrandom from 'seedrandom'
import { describe, expect, it } from 'vitest'
import { parseDecimalBytes } from './parse-decimal-bytes'

const parse = (text: string, decimalComma = false) => {
  const bytes = Buffer.from(`x${text}y`)
  return parseDecimalBytes(bytes, 1, bytes.length - 1, decimalComma)
}

// The reference is JavaScript's own Number() (ECMAScript StringToNumber, correctly rounded): common practice, no source.
describe('parseDecimalBytes', () => {
  it('equals Number() bit for bit on plain decimals', () => {
    for (const text of [
      '0',
      '-0',
      '+7',
      '12.5',
      '-0.05',
      '.25',
      '5.',
      '1e3',
      '1.5E-7',
      '-2.5e+10',
      '007',
      '0.1',
      '0.3',
    ])
      expect(Object.is(parse(text), Number(text)), text).toBe(true)
  })

  it('equals Number() on 200,000 random decimals of up to 15 significant digits', () => {
    const random = seedrandom('parse-decimal-bytes')
    let fellBack = 0
    for (let k = 0; k < 200_000; k++) {
      const digits = String(Math.floor(random() * 10 ** (1 + Math.floor(random() * 15))))
      const point = Math.floor(random() * (digits.length + 1))
      const sign = random() < 0.3 ? '-' : ''
      const exponent = random() < 0.2 ? `e${Math.floor(random() * 40) - 20}` : ''
      const text = `${sign}${digits.slice(0, point)}.${digits.slice(point)}${exponent}`
      const value = parse(text)
      if (Number.isNaN(value)) fellBack++
      else expect(value, text).toBe(Number(text))
    }
    // Only exponents past 1e±22 fall back; the fast path must carry nearly all of the sample.
    expect(fellBack).toBeLessThan(10_000)
  })

  it('reads a decimal comma only when asked', () => {
    expect(parse('1,5', true)).toBe(1.5)
    expect(parse('-2,25e1', true)).toBe(-22.5)
    expect(parse('1,5')).toBeNaN()
  })

  it('leaves everything else to the caller (NaN)', () => {
    for (const text of [
      '',
      ' 1',
      '1 ',
      'NA',
      '-',
      '.',
      'e5',
      '1e',
      '1e+',
      '0x10',
      'Infinity',
      '1.2.3',
      '1,5,5',
      '12345678901234567',
    ])
      expect(parse(text, true), text).toBeNaN()
  })

  it('leaves exponents beyond the exact powers of ten to the caller', () => {
    expect(parse('1e23')).toBeNaN()
    expect(parse('1e22')).toBe(1e22)
    expect(parse('123e-25')).toBeNaN()
  })
})
