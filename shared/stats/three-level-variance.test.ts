import { describe, expect, it } from 'vitest'
import { threeLevelVariance } from './three-level-variance'

const variances = { labArmVariance: 2, unitVariance: 20, residualVariance: 100 }

describe('threeLevelVariance', () => {
  it('gives (2σ²_lab×arm + 2(σ²_unit + σ²_resid/m)/k)/L with L − 1 df when every lab runs every arm', () => {
    // Hand calculation of the formula (Raudenbush & Liu 2000 with a unit level):
    // w = 20 + 100/20 = 25; (2·2 + 2·25/5)/4 = 14/4 = 3.5; ceiling 2·2/4 = 1.
    expect(threeLevelVariance({ labs: 4, unitsPerLabArm: 5, obsPerUnit: 20, ...variances })).toEqual({
      variance: 3.5,
      df: 3,
      ceilingVariance: 1,
      unitMeanVariance: 25,
    })
  })

  it('lets σ²_lab cancel when every lab runs every arm, but not when each lab runs one arm', () => {
    // Hand calculation: one arm per lab, L = 3 per arm: 2(3 + 2 + 25/5)/3 = 20/3, df 2(3 − 1) = 4.
    const design = { labs: 3, unitsPerLabArm: 5, obsPerUnit: 20, ...variances }
    expect(threeLevelVariance({ ...design, labVariance: 3 }).variance).toBe(
      threeLevelVariance(design).variance,
    )
    const oneArm = threeLevelVariance({ ...design, labVariance: 3, design: 'one-arm' })
    expect(oneArm.variance).toBeCloseTo(20 / 3, 14)
    expect(oneArm.df).toBe(4)
    expect(oneArm.ceilingVariance).toBeCloseTo(10 / 3, 14)
  })

  it('is the two-level formula with one lab: 2σ²(1 + (m − 1)ρ)/(k m), df 2(k − 1)', () => {
    // Kish design effect form (common practice): σ² = 120, ρ = 20/120, m = 20, k = 6.
    const r = threeLevelVariance({
      labs: 1,
      unitsPerLabArm: 6,
      obsPerUnit: 20,
      ...variances,
      labArmVariance: 0,
    })
    expect(r.variance).toBeCloseTo((2 * 120 * (1 + 19 * (20 / 120))) / (6 * 20), 12)
    expect(r.df).toBe(10)
    expect(r.ceilingVariance).toBe(0)
  })

  it('refuses designs it cannot judge', () => {
    const ok = { labs: 4, unitsPerLabArm: 5, obsPerUnit: 20, ...variances }
    expect(() => threeLevelVariance({ ...ok, labs: 1 })).toThrow(/with one lab, how much labs differ/)
    expect(() => threeLevelVariance({ ...ok, labs: 2.5 })).toThrow(/whole number of labs/)
    expect(() => threeLevelVariance({ ...ok, labs: 1, design: 'one-arm' })).toThrow(/at least 2 labs per arm/)
    expect(() => threeLevelVariance({ ...ok, labs: 1, labArmVariance: 0, unitsPerLabArm: 1 })).toThrow(
      /at least 2 units per arm/,
    )
    expect(() => threeLevelVariance({ ...ok, unitsPerLabArm: 0.5 })).toThrow(/at least one unit per lab/)
    expect(() => threeLevelVariance({ ...ok, obsPerUnit: 0 })).toThrow(/at least one observation/)
    expect(() => threeLevelVariance({ ...ok, unitVariance: -1 })).toThrow(/unitVariance must be/)
    expect(() => threeLevelVariance({ ...ok, labVariance: Number.NaN })).toThrow(/labVariance/)
    expect(() =>
      threeLevelVariance({ ...ok, labArmVariance: 0, unitVariance: 0, residualVariance: 0 }),
    ).toThrow(/every variance is 0/)
    expect(() => threeLevelVariance({ ...ok, design: 'crossed' as never })).toThrow(/unknown design/)
  })
})
