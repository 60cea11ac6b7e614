import { describe, expect, it } from 'vitest'
import { dyestuffGroups } from '../stats/fixtures/dyestuff-groups'
import type { Factor, NestedColumns } from '../stats/types'
import { labAgreement } from './lab-agreement'

function factor(name: string, values: string[]): Factor {
  const labels: string[] = []
  const index = new Map<string, number>()
  const codes = Int32Array.from(values, (v) => {
    if (!index.has(v)) {
      index.set(v, labels.length)
      labels.push(v)
    }
    return index.get(v)!
  })
  return { name, codes, labels }
}

describe('labAgreement', () => {
  it('gives the ISO 5725-2 precision of Dyestuff with batches as labs and each preparation a unit', () => {
    // Dyestuff (Davies & Goldsmith 1972; lme4): 6 batches × 5 preparations. With one result per unit
    // the unit means are the results, so s_r² = MSW = 2451.25 and s_L² = (MSB − MSW)/5 = 1764.05
    // (STATS.md check values; balanced ANOVA = lme4 REML here); r = 2.8 s_r, R = 2.8 s_R (ISO 5725-2).
    const labs = dyestuffGroups.flatMap((g, i) => g.map(() => String.fromCharCode(65 + i)))
    const units = dyestuffGroups.flatMap((g) => g.map((_, j) => `prep${j + 1}`))
    const columns: NestedColumns = {
      responseName: 'yield',
      response: Float64Array.from(dyestuffGroups.flat()),
      levels: [factor('batch', labs), factor('preparation', units)],
    }
    const result = labAgreement(columns)
    expect(result.precision.sr ** 2).toBeCloseTo(2451.25, 6)
    expect(result.precision.sL ** 2).toBeCloseTo(1764.05, 6)
    expect(result.precision.R).toBeCloseTo(2.8 * Math.sqrt(2451.25 + 1764.05), 6)
    expect(result.precision.grandMean).toBeCloseTo(1527.5, 9)
    // Batch E has the highest mean (1600); h by hand (common practice, no source): batch means
    // 1505, 1528, 1564, 1498, 1600, 1470; their mean 1527.5 and SD √(11271.5 / 5) (MSB / n).
    const e = result.labs.find((l) => l.label === 'E')!
    expect(e.h).toBeCloseTo((1600 - 1527.5) / Math.sqrt(11271.5 / 5), 9)
    // One observation per unit: no spread inside units to test, and no effect without a condition.
    expect(result.mandel.kWithinUnits).toBeNull()
    expect(result.effect).toBeNull()
  })

  it('tests the lab × condition interaction like R anova(lm(y ~ lab + cond), lm(y ~ lab * cond))', () => {
    // Invented unit means, one observation per unit; R 4 (lm/anova) on the same 15 values:
    // RSS additive 24.814752252, full 6.763333333, F(2, 9) = 12.01055, p = 0.0028809.
    const rows: [string, string, number][] = [
      ['A', 'v', 10.2], ['A', 'v', 11.5], ['A', 't', 13.1], ['A', 't', 12.4], ['A', 't', 14.0],
      ['B', 'v', 9.1], ['B', 'v', 8.7], ['B', 'v', 10.0], ['B', 't', 15.2], ['B', 't', 14.1], ['B', 't', 16.3],
      ['C', 'v', 11.0], ['C', 'v', 12.2], ['C', 't', 11.8], ['C', 't', 12.9],
    ] // prettier-ignore
    const columns: NestedColumns = {
      responseName: 'y',
      response: Float64Array.from(rows.map((r) => r[2])),
      levels: [
        factor(
          'lab',
          rows.map((r) => r[0]),
        ),
        factor(
          'mouse',
          rows.map((_, i) => `m${i}`),
        ),
      ],
      factors: [
        factor(
          'cond',
          rows.map((r) => r[1]),
        ),
      ],
    }
    const result = labAgreement(columns, { reference: 'v' })
    const interaction = result.effect!.interaction!
    expect(interaction.df1).toBe(2)
    expect(interaction.df2).toBe(9)
    expect(interaction.f).toBeCloseTo(12.01055, 4)
    expect(interaction.p).toBeCloseTo(0.0028809, 6)
    expect(interaction.sentence).toMatch(/^The labs disagree on the effect/)
    // Lab B's effect by hand: mean(15.2, 14.1, 16.3) − mean(9.1, 8.7, 10.0) = 15.2 − 9.2667.
    expect(result.effect!.perLab.find((e) => e.lab === 'B')!.estimate).toBeCloseTo(15.2 - 27.8 / 3, 10)
  })

  it('flags a lab whose observations inside units are twice as noisy, and no lab when all are alike', () => {
    // Invented data (flag expected by construction): 4 labs × 4 units × 30 observations, lab D with
    // SD 2 inside units against 1 elsewhere; deterministic quasi-normal noise so the test is stable.
    const build = (noisy: boolean) => {
      const labs: string[] = []
      const units: string[] = []
      const y: number[] = []
      let z = 0.5
      for (const lab of ['A', 'B', 'C', 'D'])
        for (let u = 0; u < 4; u++)
          for (let j = 0; j < 30; j++) {
            z = (z * 9301 + 49297) % 233280
            // Sum of 3 uniforms, centred and scaled to SD 1.
            const r = [0, 1, 2].reduce((s) => {
              z = (z * 9301 + 49297) % 233280
              return s + z / 233280
            }, 0)
            labs.push(lab)
            units.push(`u${u}`)
            y.push(10 + u * 0.3 + (r - 1.5) * 2 * (noisy && lab === 'D' ? 2 : 1))
          }
      return labAgreement({
        responseName: 'y',
        response: Float64Array.from(y),
        levels: [factor('lab', labs), factor('unit', units)],
      })
    }
    const noisy = build(true)
    expect(noisy.labs.find((l) => l.label === 'D')!.kWithinFlag).toBe('outlier')
    expect(noisy.tests.find((t) => t.name.startsWith('Cochran (observations'))).toMatchObject({
      lab: 'D',
      flag: 'outlier',
    })
    const calm = build(false)
    expect(calm.tests.find((t) => t.name.startsWith('Cochran (observations'))!.flag).toBe('ok')
  })

  it('refuses fewer than 3 labs and a design without a level inside the labs', () => {
    const two: NestedColumns = {
      responseName: 'y',
      response: Float64Array.from([1, 2, 3, 4]),
      levels: [factor('lab', ['A', 'A', 'B', 'B']), factor('unit', ['1', '2', '1', '2'])],
    }
    expect(() => labAgreement(two)).toThrow(/at least 3 labs/)
    expect(() => labAgreement({ ...two, levels: [two.levels[0]] })).toThrow(/level inside/)
  })
})
