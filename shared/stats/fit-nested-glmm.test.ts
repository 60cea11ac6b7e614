import seedrandom from 'seedrandom'
import { describe, expect, it } from 'vitest'
import { EngineInputError } from './engine-input-error'
import { fitNestedGlmm } from './fit-nested-glmm'
import { oneRowPerMouseTable } from '../analysis/fixtures/invented-glmm-tables'
import { glmFit } from './glmm/glm-fit'
import { bacteria } from './fixtures/bacteria'
import { nestedColumnsFromTable } from './fixtures/nested-columns-from-table'
import { prepareNestedDesign } from './prepare-nested-design'

describe('fitNestedGlmm', () => {
  it('reproduces glmer on MASS bacteria (binary, y ~ trt + (1|ID))', () => {
    // lme4 1.1-31: glmer(y ~ trt + (1|ID), bacteria, binomial, bobyqa rhoend 1e-10, tolPwrss 1e-13):
    // fixef 2.295869360 / −1.202120099 (drug) / −0.709514017 (drug+), SE 0.4632707 / 0.5834421 / 0.5945135,
    // σ²_ID 0.9660943. (Our labels follow the file: placebo, drug+, drug.)
    const design = prepareNestedDesign(nestedColumnsFromTable(bacteria, 'y', ['ID'], 'trt'), {
      reference: { trt: 'placebo' },
    })
    const fit = fitNestedGlmm(design, { family: 'binomial' })
    const names = design.factors[0].labels
    const beta = (label: string) => fit.beta[names.indexOf(label)]
    const se = (label: string) => Math.sqrt(fit.vcovBeta[names.indexOf(label)][names.indexOf(label)])
    expect(fit.beta[0] / 2.29586936).toBeCloseTo(1, 5)
    expect(beta('drug') / -1.202120099).toBeCloseTo(1, 5)
    expect(beta('drug+') / -0.709514017).toBeCloseTo(1, 5)
    expect(Math.sqrt(fit.vcovBeta[0][0]) / 0.4632707145).toBeCloseTo(1, 4)
    expect(se('drug') / 0.5834420832).toBeCloseTo(1, 4)
    expect(se('drug+') / 0.5945135466).toBeCloseTo(1, 4)
    expect(fit.components[0].variance / 0.9660943095).toBeCloseTo(1, 4)
    expect(fit.converged).toBe(true)
    expect(fit.nRows).toBe(50)
  })

  it('gives the same fit from successes out of trials as from one row per trial (common practice, no source)', () => {
    const rng = seedrandom('aggregated')
    const perRow = { lab: [] as string[], mouse: [] as string[], arm: [] as string[], y: [] as number[] }
    const aggregated = {
      lab: [] as string[],
      mouse: [] as string[],
      arm: [] as string[],
      s: [] as number[],
      n: [] as number[],
    }
    for (let l = 0; l < 5; l++) {
      for (let m = 0; m < 6; m++) {
        const arm = m % 2 ? 'KX-9' : 'vehicle'
        const p = 0.3 + 0.1 * (m % 2) + 0.05 * l + 0.1 * rng()
        for (let well = 0; well < 3; well++) {
          const n = 4 + Math.floor(rng() * 8)
          let s = 0
          for (let i = 0; i < n; i++) {
            const y = rng() < p ? 1 : 0
            s += y
            perRow.lab.push(`L${l}`)
            perRow.mouse.push(`m${m}`)
            perRow.arm.push(arm)
            perRow.y.push(y)
          }
          aggregated.lab.push(`L${l}`)
          aggregated.mouse.push(`m${m}`)
          aggregated.arm.push(arm)
          aggregated.s.push(s)
          aggregated.n.push(n)
        }
      }
    }
    const one = fitNestedGlmm(
      prepareNestedDesign(nestedColumnsFromTable(perRow, 'y', ['lab', 'mouse'], 'arm')),
      {
        family: 'binomial',
      },
    )
    const design = prepareNestedDesign(nestedColumnsFromTable(aggregated, 's', ['lab', 'mouse'], 'arm'))
    const two = fitNestedGlmm(design, { family: 'binomial', trials: Float64Array.from(aggregated.n) })
    one.beta.forEach((b, i) => expect(two.beta[i]).toBeCloseTo(b, 6))
    one.components.forEach((c, i) => expect(two.components[i].variance).toBeCloseTo(c.variance, 6))
    one.vcovBeta.forEach((row, i) => expect(Math.sqrt(two.vcovBeta[i][i])).toBeCloseTo(Math.sqrt(row[i]), 5))
  })

  it('refuses a response without any success (nothing to compare)', () => {
    const zeros = { ...bacteria, y: bacteria.y.map(() => 0) }
    const design = prepareNestedDesign(nestedColumnsFromTable(zeros, 'y', ['ID'], 'trt'))
    expect(() => fitNestedGlmm(design, { family: 'binomial' })).toThrow(EngineInputError)
    expect(() => fitNestedGlmm(design, { family: 'binomial' })).toThrow(/no successes/)
  })

  it('puts the observation-level term of a 0/1 response at exactly 0 and gives the GLM', () => {
    // One 0/1 row per mouse: the mouse term is not identified and its Laplace deviance rises only
    // as σ⁴ from 0, where Newton used to stall at σ ≈ 3e-3 and report SEs up to 8 % above glm's.
    // Reference: R 4.x glm(y ~ treatment, binomial), live in tests/reference/glmm-boundary-reference.test.ts;
    // here against the engine's own GLM (glmFit), which that file and glmer-reference.test.ts check against glm().
    for (const seed of ['a', 'b', 'c', 'd', 'e']) {
      const design = prepareNestedDesign(
        nestedColumnsFromTable(oneRowPerMouseTable(120, seed), 'marker01', ['mouse'], 'treatment'),
        { observationLevelUnits: true },
      )
      const fit = fitNestedGlmm(design, { family: 'binomial' })
      expect(fit.components[0].variance).toBe(0)
      expect(fit.singular).toBe(true)
      const plain = glmFit(fit.rows, 1)
      plain.beta.forEach((b, i) => expect(fit.beta[i]).toBeCloseTo(b, 7))
      plain.vcov.forEach((row, i) => expect(Math.sqrt(fit.vcovBeta[i][i] / row[i])).toBeCloseTo(1, 6))
    }
  })
})
