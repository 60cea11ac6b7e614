import { describe, expect, it } from 'vitest'
import seedrandom from 'seedrandom'
import { designEffect } from './design-effect'
import { EngineInputError } from './engine-input-error'
import { normalQuantile } from './normal-quantile'

describe('designEffect', () => {
  it('gives Kish 1 + (m − 1)ρ for equal clusters, and the same value from the unequal formula', () => {
    // Kish (1965): m = 10, ρ = 0.1 → 1.9 (also the DEFF in the clusterPower crtpwr.2mean example).
    const r = designEffect({ clusterSizes: [10, 10, 10, 10], icc: 0.1 })
    expect(r.kish).toBeCloseTo(1.9, 12)
    expect(r.unequal).toBeCloseTo(1.9, 12)
    expect(r.cv).toBe(0)
    expect(r.meanSize).toBe(10)
  })

  it('uses (cv² + 1) m̄ = Σ m² / Σ m for unequal sizes', () => {
    // Identity behind Eldridge, Ashby & Kerry (2006) with the divisor-k SD (Kerry & Bland 2001).
    const sizes = [10, 20, 30]
    const r = designEffect({ clusterSizes: sizes, icc: 0.1 })
    const weighted = (100 + 400 + 900) / 60
    expect(r.meanSize).toBe(20)
    expect(r.cv).toBeCloseTo(Math.sqrt(200 / 3) / 20, 12)
    expect(r.unequal).toBeCloseTo(1 + (weighted - 1) * 0.1, 12)
    expect(r.kish).toBeCloseTo(2.9, 12)
  })

  it('matches the simulated variance of a mean over unequal clusters', () => {
    // Common practice, no source: Monte Carlo check of the formula under a random-intercept model.
    const sizes = [2, 3, 5, 8, 12, 20, 30, 50]
    const icc = 0.2
    const rng = seedrandom('deff-unequal')
    const normal = () => normalQuantile(Math.min(Math.max(rng(), 1e-12), 1 - 1e-12))
    const total = sizes.reduce((a, b) => a + b, 0)
    const reps = 10000
    let sum = 0
    let sumSq = 0
    for (let r = 0; r < reps; r++) {
      let s = 0
      for (const m of sizes) {
        const u = Math.sqrt(icc) * normal()
        for (let j = 0; j < m; j++) s += u + Math.sqrt(1 - icc) * normal()
      }
      const mean = s / total
      sum += mean
      sumSq += mean * mean
    }
    const variance = (sumSq - (sum * sum) / reps) / (reps - 1)
    const expected = designEffect({ clusterSizes: sizes, icc }).unequal / total
    // The SE of a variance from 10000 normal draws is about 1.4%; allow 5%.
    expect(variance / expected).toBeGreaterThan(0.95)
    expect(variance / expected).toBeLessThan(1.05)
  })

  it('refuses malformed input', () => {
    expect(() => designEffect({ clusterSizes: [], icc: 0.1 })).toThrow(/at least one cluster size/)
    expect(() => designEffect({ clusterSizes: [3, 0], icc: 0.1 })).toThrow(/positive number/)
    expect(() => designEffect({ clusterSizes: [3, Number.NaN], icc: 0.1 })).toThrow(EngineInputError)
    expect(() => designEffect({ clusterSizes: [3, 4], icc: -0.1 })).toThrow(/icc must be between 0 and 1/)
    expect(() => designEffect({ clusterSizes: [3, 4], icc: 1.5 })).toThrow(/icc/)
    expect(() => designEffect({ clusterSizes: [3, 4], icc: Number.NaN })).toThrow(/icc/)
    expect(() => designEffect(undefined as never)).toThrow(/at least one cluster size/)
  })
})
