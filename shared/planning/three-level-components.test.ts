import { describe, expect, it } from 'vitest'
import type { AnalysisResult } from '../schemas/analysis-result'
import { level, share, single, v01, v02 } from './fixtures/multi-lab-results'
import { threeLevelComponents } from './three-level-components'

describe('threeLevelComponents', () => {
  it('keeps a one-level result a plan for one lab, as the two-level planner read it', () => {
    const c = threeLevelComponents(single)!
    const [mouse, residual] = single.varianceComponents
    expect(c.outer).toBeNull()
    expect(c.unitLevel).toBe('mouse')
    expect(c.unitVariance).toBeCloseTo(mouse.variance, 9)
    expect(c.residualVariance).toBeCloseTo(residual.variance, 9)
  })

  it('maps lab, lab:treatment, lab:mouse and the residual of the maximal model to the three levels', () => {
    // Hand placement (the rules in the doc block): σ²_lab×arm = lab:treatment, unit = mouse, residual = cells.
    const c = threeLevelComponents(v02)!
    expect(c).toMatchObject({
      outer: { name: 'lab', nUnits: 4, design: 'every-arm' },
      unitLevel: 'mouse',
      unitVariance: 20,
      residualVariance: 100,
      labArmVariance: 2,
      labVariance: 30,
      mapping: [],
    })
  })

  it('reads components named after the level as well ("mouse" for "lab:mouse")', () => {
    const renamed: AnalysisResult = {
      ...v02,
      model: {
        ...v02.model!,
        random: v02.model!.random.map((t) => (t.level === 'mouse' ? { ...t, name: 'mouse' } : t)),
      },
      varianceComponents: v02.varianceComponents.map((c) =>
        c.level === 'lab:mouse' ? { ...c, level: 'mouse' } : c,
      ),
    }
    expect(threeLevelComponents(renamed)).toMatchObject({ unitVariance: 20, labArmVariance: 2 })
  })

  it('treats the lab × condition variance of an engine 0.1 result as unknown', () => {
    const c = threeLevelComponents(v01)!
    expect(c.outer).toMatchObject({ name: 'lab', design: 'every-arm' })
    expect(c.labArmVariance).toBeNull()
    expect(c.unitVariance).toBe(20)
    expect(c.residualVariance).toBe(100)
    expect(c.mapping.join(' ')).toMatch(
      /engine 0\.1\.0\) did not estimate how much the effect differs between labs/,
    )
  })

  it('adds a middle level × condition term to the units, leaves its own variance out, and puts deeper levels with the cells', () => {
    // lab > day > mouse > slice > cell, treatment between mice within days.
    const deep: AnalysisResult = {
      ...v02,
      levels: [level('lab', 3), level('day', 9), level('mouse', 36), level('slice', 108)],
      factors: [{ name: 'treatment', labels: ['vehicle', 'KX-9'], reference: 'vehicle', level: 'mouse' }],
      conditionLevel: 'mouse',
      model: {
        formula: '…',
        random: [
          { name: 'lab', level: 'lab', factor: null, nGroups: 3 },
          { name: 'lab:treatment', level: 'lab', factor: 'treatment', nGroups: 6 },
          { name: 'day', level: 'day', factor: null, nGroups: 9 },
          { name: 'day:treatment', level: 'day', factor: 'treatment', nGroups: 18 },
          { name: 'mouse', level: 'mouse', factor: null, nGroups: 36 },
          { name: 'slice', level: 'slice', factor: null, nGroups: 108 },
        ],
        skipped: [],
      },
      varianceComponents: share([
        { level: 'lab', variance: 30 },
        { level: 'lab:treatment', variance: 2 },
        { level: 'day', variance: 7 },
        { level: 'day:treatment', variance: 3 },
        { level: 'mouse', variance: 20 },
        { level: 'slice', variance: 5 },
        { level: 'residual', variance: 100 },
      ]),
    }
    const c = threeLevelComponents(deep)!
    expect(c).toMatchObject({
      unitLevel: 'mouse',
      unitVariance: 23,
      residualVariance: 105,
      labArmVariance: 2,
    })
    expect(c.mapping.join(' ')).toMatch(/day:treatment spread is counted with the mouse spread/)
    expect(c.mapping.join(' ')).toMatch(/slice spread inside a mouse is counted with the observations/)
  })

  it('reads a lab that carries the condition as one arm per lab, and a second factor as left out', () => {
    const oneArm: AnalysisResult = {
      ...v01,
      conditionLevel: 'plate',
      levels: [level('plate', 6), level('well', 60)],
      varianceComponents: share([
        { level: 'plate', variance: 4 },
        { level: 'well', variance: 9 },
        { level: 'residual', variance: 50 },
      ]),
    }
    expect(threeLevelComponents(oneArm)).toMatchObject({
      outer: { name: 'plate', nUnits: 6, design: 'one-arm' },
      unitLevel: 'well',
      unitVariance: 9,
      residualVariance: 50,
      labVariance: 4,
      labArmVariance: 0,
    })
    const twoFactors: AnalysisResult = {
      ...v02,
      factors: [v02.factors![0], { name: 'genotype', labels: ['wt', 'ko'], reference: 'wt', level: 'mouse' }],
      model: {
        ...v02.model!,
        random: [
          ...v02.model!.random,
          { name: 'lab:genotype', level: 'lab', factor: 'genotype', nGroups: 8 },
        ],
      },
      varianceComponents: share([...v02.varianceComponents, { level: 'lab:genotype', variance: 9 }]),
    }
    const c = threeLevelComponents(twoFactors)!
    expect(c).toMatchObject({ labArmVariance: 2, unitVariance: 20, residualVariance: 100 })
    expect(c.mapping.join(' ')).toMatch(/The plan is for “treatment”/)
  })

  it('says the lab × condition variance is unknown when the fitted model had to leave it out', () => {
    const skipped: AnalysisResult = {
      ...v02,
      model: {
        ...v02.model!,
        random: v02.model!.random.filter((t) => t.factor === null),
        skipped: [{ name: 'lab:treatment', sameAs: 'lab:mouse' }],
      },
      varianceComponents: share(v02.varianceComponents.filter((c) => c.level !== 'lab:treatment')),
    }
    const c = threeLevelComponents(skipped)!
    expect(c.labArmVariance).toBeNull()
    expect(c.mapping.join(' ')).toMatch(/could not be told apart from lab:mouse/)
  })
})
