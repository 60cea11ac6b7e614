import { describe, expect, it } from 'vitest'
import { PlanInputs } from '../../../shared/schemas/plans'
import { computePlan } from '../../../shared/planning/compute-plan'
import { consortium as inputs } from '../../../shared/planning/fixtures/consortium'
import { ceilingSentence } from './ceiling-words'

describe('ceilingSentence', () => {
  it('names the largest number of labs drawn whose ceiling stays below the target, and how many labs it takes', () => {
    const result = computePlan(PlanInputs.parse(inputs))
    const below = result.labCurves.filter((c) => c.ceilingPower < 0.8).at(-1)!
    const sentence = ceilingSentence(result, { outer: 'lab', unit: 'mouse', targetPower: 0.8 })!
    expect(sentence).toBe(
      `With ${below.labs} labs, no number of mice reaches more than ${Math.round(below.ceilingPower * 100)} % power: labs differ in how strongly they respond. It takes at least ${result.fewestLabs} labs to reach 80 %.`,
    )
  })

  it('names the plan’s own labs when too few are allowed to reach the target', () => {
    const result = computePlan(
      PlanInputs.parse({ ...inputs, outer: { ...inputs.outer, minLabs: 4, maxLabs: 4 } }),
    )
    expect(result.feasible).toBe(false)
    const own = result.labCurves.find((c) => c.labs === 4)!
    expect(ceilingSentence(result, { outer: 'lab', unit: 'mouse', targetPower: 0.8 })).toBe(
      `With 4 labs, no number of mice reaches more than ${Math.round(own.ceilingPower * 100)} % power: labs differ in how strongly they respond. It takes at least ${result.fewestLabs} labs to reach 80 %.`,
    )
  })

  it('falls back to the recommended labs, says when nothing caps the power, and stays silent for one lab', () => {
    const easy = computePlan(
      PlanInputs.parse({ ...inputs, difference: 20, outer: { ...inputs.outer, effectSd: 1 } }),
    )
    expect(ceilingSentence(easy, { outer: 'day', unit: 'plate', targetPower: 0.8 })).toMatch(
      new RegExp(
        `^With ${easy.labs} days, no number of plates reaches more than \\d+ % power: days differ in how strongly they respond\\.$`,
      ),
    )
    const none = computePlan(PlanInputs.parse({ ...inputs, outer: { ...inputs.outer, effectSd: 0 } }))
    expect(ceilingSentence(none, { outer: 'lab', unit: 'mouse', targetPower: 0.8 })).toMatch(
      /nothing caps the power/,
    )
    const single = computePlan(PlanInputs.parse({ ...inputs, outer: undefined }))
    expect(ceilingSentence(single, { outer: 'lab', unit: 'mouse', targetPower: 0.8 })).toBeNull()
  })

  it('speaks of labs per arm when each lab runs one arm', () => {
    const oneArm = computePlan(
      PlanInputs.parse({
        ...inputs,
        outer: { name: 'plate', design: 'one-arm', minLabs: 2, maxLabs: 6, sdBetweenLabs: 4 },
      }),
    )
    expect(ceilingSentence(oneArm, { outer: 'plate', unit: 'well', targetPower: 0.8 })).toMatch(
      /plates per arm, no number of wells reaches more than \d+ % power: plates differ from each other/,
    )
  })
})
