import { describe, expect, it } from 'vitest'
import { responseUnit, withUnit } from './response-unit'

// Unit suffixes as lab exports name them (common practice, no source).
describe('responseUnit', () => {
  it.each([
    ['neurite_length_um', 'µm'],
    ['soma area (µm²)', 'µm²'],
    ['soma_area_um2', 'µm²'],
    ['latency_ms', 'ms'],
    ['glucose mM', 'mM'],
    ['thickness_mm', 'mm'],
    ['viability_pct', '%'],
    ['intensity [AU]', 'a.u.'],
  ])('reads %s as %s', (name, unit) => {
    expect(responseUnit(name)).toBe(unit)
  })

  it.each(['neurite_length', 'um', 'sums', 'score (1-5)', 'ratio_x'])('does not guess for %s', (name) => {
    expect(responseUnit(name)).toBeNull()
  })

  it('puts the unit after the number only when known', () => {
    expect(withUnit('9.80', 'µm')).toBe('9.80 µm')
    expect(withUnit('9.80', null)).toBe('9.80')
  })
})
