import { describe, expect, it } from 'vitest'
import { buildWarnings, type WarningFacts } from './build-warnings'

/** 6 labs × 4 animals × 10 cells, treatment between animals, 12 animals per arm: nothing to warn about. */
function cleanFacts(): WarningFacts {
  return {
    responseName: 'neurite_length_um',
    levels: [
      { name: 'lab', unitSizes: Array(6).fill(40), childrenPerUnit: Array(6).fill(4) },
      { name: 'animal', unitSizes: Array(24).fill(10), childrenPerUnit: null },
    ],
    condition: {
      name: 'treatment',
      level: 'animal',
      unitsPerCondition: [
        { condition: 'vehicle', nUnits: 12 },
        { condition: 'NW-117', nUnits: 12 },
      ],
      constantConditions: [],
    },
    factors: [{ name: 'treatment', carrier: 'animal' }],
    levelEffects: [],
    unitMeansProblem: null,
    zeroVarianceLevels: [],
    implicitNesting: [],
    nDropped: 0,
    naiveShown: false,
    converged: true,
  }
}

const codes = (facts: WarningFacts) => buildWarnings(facts).map((w) => w.code)

describe('buildWarnings', () => {
  it('raises nothing for a clean, balanced design', () => {
    expect(buildWarnings(cleanFacts())).toEqual([])
  })

  it('FEW_UNITS names each condition with fewer than 3 units at the level that carries it', () => {
    const facts = cleanFacts()
    facts.condition!.unitsPerCondition = [
      { condition: 'vehicle', nUnits: 2 },
      { condition: 'NW-117', nUnits: 3 },
    ]
    const [warning] = buildWarnings(facts)
    expect(warning.code).toBe('FEW_UNITS')
    expect(warning.message).toContain('"vehicle" has 2 animal units')
    expect(warning.message).not.toContain('NW-117')
  })

  it('CONDITION_CONFOUNDED when the outermost level carries the condition', () => {
    const facts = cleanFacts()
    facts.condition!.level = 'lab'
    facts.factors = [{ name: 'treatment', carrier: 'lab' }]
    facts.condition!.unitsPerCondition = [
      { condition: 'vehicle', nUnits: 3 },
      { condition: 'NW-117', nUnits: 3 },
    ]
    expect(codes(facts)).toEqual(['CONDITION_CONFOUNDED'])
    expect(buildWarnings(facts)[0].message).toMatch(/Every lab ran a single treatment.*rests on 6 lab units/)
  })

  it('does not call a single-level design with the condition between its units confounded', () => {
    const facts = cleanFacts()
    facts.levels = [facts.levels[1]]
    expect(codes(facts)).toEqual([])
  })

  it('LEVEL_EFFECT_FEW_UNITS says what few labs do to the df of the comparison', () => {
    const facts = cleanFacts()
    facts.levelEffects = [
      { term: 'lab:treatment', level: 'lab', factor: 'treatment', nLabels: 2, nUnits: 4, variance: 2.5 },
    ]
    expect(codes(facts)).toEqual(['LEVEL_EFFECT_FEW_UNITS'])
    expect(buildWarnings(facts)[0].message).toMatch(
      /only 4 lab units show how much.*about 3 degrees of freedom/,
    )
    facts.levelEffects[0].variance = 0
    expect(buildWarnings(facts)[0].message).toMatch(/estimated as 0 here/)
    facts.levelEffects[0].nUnits = 5
    expect(codes(facts)).toEqual([])
  })

  it('LEVEL_EFFECT_FEW_UNITS of a binary or count model speaks of its z test, which has no df', () => {
    const facts = { ...cleanFacts(), family: 'binomial' as const }
    facts.levelEffects = [
      { term: 'lab:treatment', level: 'lab', factor: 'treatment', nLabels: 2, nUnits: 3, variance: 0.4 },
    ]
    const message = buildWarnings(facts).find((w) => w.code === 'LEVEL_EFFECT_FEW_UNITS')!.message
    expect(message).toMatch(/z test does not widen its interval/)
    expect(message).not.toMatch(/degrees of freedom/)
  })

  it('BOUNDARY_FIT, NOT_CONVERGED and NAIVE_TEST_INVALID come from the fit and the result', () => {
    const facts = { ...cleanFacts(), zeroVarianceLevels: ['lab'], converged: false, naiveShown: true }
    expect(codes(facts)).toEqual(['BOUNDARY_FIT', 'NOT_CONVERGED', 'NAIVE_TEST_INVALID'])
    expect(buildWarnings(facts)[0].message).toContain('"lab" units was estimated as 0')
  })

  it('NO_VARIATION names the conditions whose values are all equal', () => {
    const facts = cleanFacts()
    facts.condition!.constantConditions = ['NW-117']
    expect(buildWarnings(facts)).toEqual([
      expect.objectContaining({ code: 'NO_VARIATION', message: expect.stringContaining('under "NW-117"') }),
    ])
  })

  it('SINGLE_OBSERVATION_UNITS and SINGLE_CHILD_UNITS count the affected units', () => {
    const facts = cleanFacts()
    facts.levels[1].unitSizes = [1, 1, ...Array(22).fill(10)]
    facts.levels[0].childrenPerUnit = [1, 4, 4, 4, 4, 4]
    const warnings = buildWarnings(facts)
    expect(warnings.map((w) => w.code)).toEqual(['SINGLE_OBSERVATION_UNITS', 'SINGLE_CHILD_UNITS'])
    expect(warnings[0].message).toMatch(/^2 of 24 animal units have a single observation/)
    expect(warnings[1].message).toMatch(/^1 of 6 lab units hold a single animal/)
  })

  it('IMPLICIT_NESTING shows a few example labels and the parent level', () => {
    const facts = {
      ...cleanFacts(),
      implicitNesting: [{ level: 'animal', labels: ['m01', 'm02', 'm03', 'm04', 'm05'] }],
    }
    const [warning] = buildWarnings(facts)
    expect(warning.code).toBe('IMPLICIT_NESTING')
    expect(warning.message).toContain('"m01", "m02", "m03" (and 2 more) occur in more than one lab')
  })

  it('UNBALANCED_UNITS fires above a coefficient of variation of 1, not at moderate imbalance', () => {
    // Sizes 1000–3000 (cv ≈ 0.35) are fine; one unit 100× the others is not. Threshold: common practice, no source.
    const moderate = cleanFacts()
    moderate.levels[1].unitSizes = [1000, 3000, 2000, 1500, 2500, ...Array(19).fill(2000)]
    expect(codes(moderate)).toEqual([])
    const extreme = cleanFacts()
    extreme.levels[1].unitSizes = [1000, ...Array(23).fill(10)]
    expect(codes(extreme)).toEqual(['UNBALANCED_UNITS'])
    expect(buildWarnings(extreme)[0].message).toContain('from 10 to 1000')
  })

  it('FEW_OUTER_UNITS below 5 outermost units when there are inner levels', () => {
    const facts = cleanFacts()
    facts.levels[0].unitSizes = [80, 80, 80]
    facts.levels[0].childrenPerUnit = [8, 8, 8]
    expect(codes(facts)).toEqual(['FEW_OUTER_UNITS'])
  })

  it('UNIT_MEANS_UNAVAILABLE passes on the reason; ROWS_DROPPED counts rows', () => {
    const facts = {
      ...cleanFacts(),
      nDropped: 1,
      unitMeansProblem: 'the treatment varies inside every unit.',
    }
    facts.condition!.level = null
    facts.condition!.unitsPerCondition = []
    const warnings = buildWarnings(facts)
    expect(warnings.map((w) => w.code)).toEqual(['ROWS_DROPPED', 'UNIT_MEANS_UNAVAILABLE'])
    expect(warnings[1].message).toBe(
      'The test on unit means is not shown: the treatment varies inside every unit. The mixed-model comparison does not need it.',
    )
    expect(warnings[0].message).toBe('1 row was left out because the response or a label was missing.')
  })

  it('uses stable SCREAMING_SNAKE codes', () => {
    const facts = { ...cleanFacts(), zeroVarianceLevels: ['animal'], naiveShown: true, nDropped: 3 }
    for (const warning of buildWarnings(facts)) expect(warning.code).toMatch(/^[A-Z][A-Z0-9_]*$/)
  })
})
