import { describe, expect, it } from 'vitest'
import seedrandom from 'seedrandom'
import { nestedDesignEffect } from './nested-design-effect'
import { designEffect } from './design-effect'
import { normalQuantile } from './normal-quantile'

describe('nestedDesignEffect', () => {
  it('sums the per-level terms for a balanced design', () => {
    // Balanced identity N·Var(ȳ)/σ² = 1 + Σ (m_l − 1) ρ_l (common practice, no source).
    const r = nestedDesignEffect([
      { unitSizes: [100, 100], share: 0.1 },
      { unitSizes: Array(20).fill(10), share: 0.2 },
    ])
    expect(r.terms[0].term).toBeCloseTo(9.9, 12)
    expect(r.terms[1].term).toBeCloseTo(1.8, 12)
    expect(r.deff).toBeCloseTo(12.7, 12)
  })

  it('reduces to the one-level unequal design effect', () => {
    const sizes = [4, 9, 17, 30]
    const one = nestedDesignEffect([{ unitSizes: sizes, share: 0.15 }])
    expect(one.deff).toBeCloseTo(designEffect({ clusterSizes: sizes, icc: 0.15 }).unequal, 12)
  })

  it('matches the simulated variance of a mean in a balanced three-level design', () => {
    // Common practice, no source: Monte Carlo, 4 labs × 5 animals × 6 cells.
    const rng = seedrandom('nested-deff')
    const normal = () => normalQuantile(Math.min(Math.max(rng(), 1e-12), 1 - 1e-12))
    const [shareLab, shareAnimal] = [0.15, 0.25]
    const reps = 10000
    let sum = 0
    let sumSq = 0
    for (let r = 0; r < reps; r++) {
      let s = 0
      for (let lab = 0; lab < 4; lab++) {
        const a = Math.sqrt(shareLab) * normal()
        for (let animal = 0; animal < 5; animal++) {
          const b = Math.sqrt(shareAnimal) * normal()
          for (let cell = 0; cell < 6; cell++) s += a + b + Math.sqrt(1 - shareLab - shareAnimal) * normal()
        }
      }
      const mean = s / 120
      sum += mean
      sumSq += mean * mean
    }
    const variance = (sumSq - (sum * sum) / reps) / (reps - 1)
    const { deff } = nestedDesignEffect([
      { unitSizes: Array(4).fill(30), share: shareLab },
      { unitSizes: Array(20).fill(6), share: shareAnimal },
    ])
    expect(variance / (deff / 120)).toBeGreaterThan(0.95)
    expect(variance / (deff / 120)).toBeLessThan(1.05)
  })

  it('refuses malformed input', () => {
    expect(() => nestedDesignEffect([])).toThrow(/at least one level/)
    expect(() => nestedDesignEffect([{ unitSizes: [], share: 0.1 }])).toThrow(
      /level 1\) requires at least one unit size/,
    )
    expect(() => nestedDesignEffect([{ unitSizes: [5], share: 1.2 }])).toThrow(
      /share of level 1 must be between 0 and 1/,
    )
    expect(() =>
      nestedDesignEffect([
        { unitSizes: [5], share: 0.6 },
        { unitSizes: [2, 3], share: 0.6 },
      ]),
    ).toThrow(/add up to 1.2/)
    expect(() => nestedDesignEffect([{ unitSizes: [5, 0], share: 0.1 }])).toThrow(/positive number/)
  })
})
