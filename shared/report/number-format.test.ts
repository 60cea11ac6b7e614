import { describe, expect, it } from 'vitest'
import { formatDf, formatInterval, formatNumber, formatP, formatShare } from './number-format'

// Wording rules from the product's number style (common practice, no source).
describe('formatP', () => {
  it('writes small p-values as a bound', () => {
    expect(formatP(0.00004639)).toBe('p < 0.001')
    expect(formatP(0.001)).toBe('p = 0.001')
  })
  it('keeps two significant digits', () => {
    expect(formatP(0.0312)).toBe('p = 0.031')
    expect(formatP(0.5577)).toBe('p = 0.56')
    expect(formatP(0.00456)).toBe('p = 0.005')
  })
  it('never rounds up to 1.0 beyond what the value says', () => {
    expect(formatP(0.999)).toBe('p = 1.00')
    expect(formatP(0.994)).toBe('p = 0.99')
  })
})

describe('formatDf', () => {
  it('gives Satterthwaite df one decimal and whole df as they are', () => {
    expect(formatDf(8.0569)).toBe('8.1')
    expect(formatDf(8)).toBe('8')
    expect(formatDf(408.94)).toBe('408.9')
  })
  it('gives a dash for a Wald interval, which has no df', () => {
    expect(formatDf(null)).toBe('—')
  })
})

describe('formatNumber', () => {
  it('keeps three significant digits by default', () => {
    expect(formatNumber(7.619431)).toBe('7.62')
    expect(formatNumber(119.7246)).toBe('120')
    expect(formatNumber(0.038358)).toBe('0.0384')
    expect(formatNumber(-11.87597)).toBe('-11.9')
  })
  it('keeps the integer digits of large numbers', () => {
    expect(formatNumber(1234.5)).toBe('1235')
  })
  it('shows a dash for missing values', () => {
    expect(formatNumber(null)).toBe('—')
    expect(formatNumber(Number.NaN)).toBe('—')
  })
})

describe('formatShare and formatInterval', () => {
  it('rounds shares to whole percent above 1%', () => {
    expect(formatShare(0.38358)).toBe('38%')
    expect(formatShare(0.004)).toBe('0.4%')
  })
  it('formats an interval', () => {
    expect(formatInterval(-11.876, 32.884)).toBe('[-11.9, 32.9]')
  })
})
