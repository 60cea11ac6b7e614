import { describe, expect, it } from 'vitest'
import { planFewestUnits } from '../stats/plan-fewest-units'
import { planThreeLevel } from '../stats/plan-three-level'
import { planNotes } from './plan-notes'

const oneLab = {
  labArmVariance: 0,
  unitVariance: 20,
  residualVariance: 100,
  difference: 8,
  minLabs: 1,
  maxLabs: 1,
}
const costs = { costPerLab: 2000, costPerUnit: 100, costPerObs: 1 }

describe('planNotes of planFewestUnits', () => {
  it('says it searched 100 observations per unit without a limit, and that a limit binds', () => {
    expect(planNotes(planFewestUnits(oneLab).remarks).join(' ')).toContain('up to 100')
    const limited = planNotes(planFewestUnits({ ...oneLab, maxObsPerUnit: 5 }).remarks)
    expect(limited).toContain('The limit on observations per unit is binding.')
    expect(limited.join(' ')).not.toContain('up to 100')
  })

  it('says what the most powerful design reaches when the unit limit stops it', () => {
    const notes = planNotes(planFewestUnits({ ...oneLab, maxUnitsPerLabArm: 3 }).remarks)
    expect(notes[notes.length - 1]).toMatch(/^No design within 1 lab, 3 units/)
  })

  it('says how many labs the target takes, in the level’s own name', () => {
    const words = { one: 'site', many: 'sites' }
    const plan = planFewestUnits({ ...oneLab, labArmVariance: 8, minLabs: 2, maxLabs: 3, labWords: words })
    expect(planNotes(plan.remarks, words).join(' ')).toContain(`It takes at least ${plan.fewestLabs} sites`)
  })
})

describe('planNotes of planThreeLevel', () => {
  const example = { ...costs, labArmVariance: 2, unitVariance: 20, residualVariance: 100, difference: 8 }

  it('words the Bonferroni level, the ceiling, the start at two labs and the limits that stop it', () => {
    const three = planThreeLevel({ ...example, arms: 3, minLabs: 3, maxLabs: 6 })
    expect(planNotes(three.remarks).join(' ')).toMatch(/Bonferroni/)
    const capped = planThreeLevel({ ...example, labArmVariance: 8, difference: 6, minLabs: 2, maxLabs: 4 })
    expect(planNotes(capped.remarks).join(' ')).toMatch(
      new RegExp(`It takes at least ${capped.fewestLabs} labs`),
    )
    const limited = planThreeLevel({
      ...example,
      minLabs: 1,
      maxLabs: 10,
      maxObsPerUnit: 8,
      maxUnitsPerLabArm: 4,
    })
    expect(planNotes(limited.remarks).join(' ')).toMatch(/search starts at 2 labs/)
    const impossible = planThreeLevel({
      ...example,
      minLabs: 2,
      maxLabs: 3,
      maxUnitsPerLabArm: 2,
      maxObsPerUnit: 10,
    })
    expect(planNotes(impossible.remarks).join(' ')).toMatch(
      /No design within 3 labs, 2 units per lab and arm/,
    )
  })

  it('use the outer level’s own name', () => {
    // A day × arm variance and at most 4 days: the notes speak of days, not labs.
    const words = { one: 'day', many: 'days' }
    const r = planThreeLevel({
      ...example,
      labArmVariance: 8,
      difference: 6,
      minLabs: 1,
      maxLabs: 4,
      labWords: words,
    })
    const notes = planNotes(r.remarks, words).join(' ')
    expect(notes).toMatch(/With one day, how much days differ/)
    expect(notes).toMatch(
      /No design with at most 4 days reaches 80 % power: with 4 days no number of units gets past \d+ %/,
    )
    expect(notes).not.toMatch(/\blabs?\b/)
  })
})
