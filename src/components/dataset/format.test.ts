import { describe, expect, it } from 'vitest'
import { formatBytes, formatCount, formatStat, nameFromFile, plural } from './format'

describe('dataset number wording', () => {
  it('groups thousands and picks singular or plural', () => {
    expect(formatCount(1234567)).toBe('1,234,567')
    expect(plural(1, 'row', 'rows')).toBe('1 row')
    expect(plural(0, 'row', 'rows')).toBe('0 rows')
    expect(plural(72000, 'row', 'rows')).toBe('72,000 rows')
  })

  it('gives file sizes in decimal units', () => {
    expect(formatBytes(999)).toBe('999 bytes')
    expect(formatBytes(1911)).toBe('1.9 kB')
    expect(formatBytes(28_400_000)).toBe('28.4 MB')
    expect(formatBytes(250_000_000)).toBe('250 MB')
  })

  it('shows column statistics with four significant digits and a dash when absent', () => {
    expect(formatStat(null)).toBe('—')
    expect(formatStat(83.19444)).toBe('83.19')
    expect(formatStat(7)).toBe('7')
    expect(formatStat(0.00012)).toBe('1.20e-4')
  })

  it('starts a dataset name from the file name without its extension', () => {
    expect(nameFromFile('neurites-three-labs.csv')).toBe('neurites-three-labs')
    expect(nameFromFile('plate.reader.export.xlsx')).toBe('plate.reader.export')
    expect(nameFromFile('no-extension')).toBe('no-extension')
  })
})
