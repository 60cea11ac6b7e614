import { describe, expect, it } from 'vitest'
import { precisionFlag } from './precision-flag'

describe('precisionFlag', () => {
  it('uses the ISO 5725-2 straggler / outlier wording', () => {
    // ISO 5725-2:1994 §7.3.2 (from memory): > 5% value and ≤ 1% value → straggler; > 1% value → outlier.
    expect(precisionFlag(1.0, 1.8, 2.18)).toBe('ok')
    expect(precisionFlag(1.8, 1.8, 2.18)).toBe('ok')
    expect(precisionFlag(2.0, 1.8, 2.18)).toBe('straggler')
    expect(precisionFlag(2.18, 1.8, 2.18)).toBe('straggler')
    expect(precisionFlag(2.2, 1.8, 2.18)).toBe('outlier')
  })
})
