import { describe, expect, it } from 'vitest'
import { powerCurve } from './power-curve'

describe('powerCurve', () => {
  it('evaluates the power on a grid, matching R pt()', () => {
    // Reference: R 4.x two-sided noncentral t power (same formula as clusterPower):
    // k = 8: m = 5 → 0.3502815702, m = 10 → 0.4804134376; k = 16: 0.6381438164, 0.8017669279.
    const r = powerCurve({ icc: 0.1, variance: 5, difference: 1, kValues: [8, 16], mValues: [5, 10] })
    expect(r.power[0][0]).toBeCloseTo(0.3502815702, 7)
    expect(r.power[0][1]).toBeCloseTo(0.4804134376, 7)
    expect(r.power[1][0]).toBeCloseTo(0.6381438164, 7)
    expect(r.power[1][1]).toBeCloseTo(0.8017669279, 7)
    expect(r.points).toHaveLength(4)
    expect(r.points[1]).toEqual({ unitsPerArm: 8, obsPerUnit: 10, power: r.power[0][1] })
    expect(r.alphaPerComparison).toBe(0.05)
  })

  it('uses the Bonferroni level for more than two arms', () => {
    const two = powerCurve({ icc: 0.1, variance: 5, difference: 1, kValues: [16], mValues: [10] })
    const four = powerCurve({ icc: 0.1, variance: 5, difference: 1, kValues: [16], mValues: [10], arms: 4 })
    expect(four.alphaPerComparison).toBeCloseTo(0.05 / 6, 12)
    expect(four.power[0][0]).toBeLessThan(two.power[0][0])
  })

  it('refuses empty, oversized or impossible grids', () => {
    const base = { icc: 0.1, variance: 5, difference: 1 }
    expect(() => powerCurve({ ...base, kValues: [], mValues: [5] })).toThrow(/at least one value/)
    expect(() => powerCurve({ ...base, kValues: Array(200).fill(5), mValues: Array(100).fill(5) })).toThrow(
      /at most 10000 grid points/,
    )
    expect(() => powerCurve({ ...base, kValues: [1], mValues: [5] })).toThrow(/at least two units per arm/)
    expect(() => powerCurve({ ...base, kValues: [4], mValues: [0] })).toThrow(/at least one observation/)
    expect(() => powerCurve({ ...base, kValues: [4], mValues: [5], arms: 1 })).toThrow(/at least two arms/)
    expect(() => powerCurve({ icc: 0.1, difference: 1, kValues: [4], mValues: [5] })).toThrow(
      /exactly one of sdTotal or variance/,
    )
  })
})
