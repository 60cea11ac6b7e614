import type { PlanResult } from '../../../shared/schemas/plans'
import { percent } from './plan-summary-rows'
import { pluralOf } from './unit-words'

export interface CeilingWords {
  /** The outer level's name, singular ("lab"). */
  outer: string
  /** The units' level, singular ("mouse"). */
  unit: string
  targetPower: number
}

const count = (n: number, word: string) => `${n} ${n === 1 ? word : pluralOf(word)}`

/**
 * The labs chart's point in one sentence: with this many labs, no number of units gets past this
 * power, because labs differ in how strongly they respond (or, one arm per lab, differ from each
 * other); and how many labs the target takes. The number of labs named is the plan's own when its
 * ceiling stays below the target (too few labs allowed), else the largest drawn whose ceiling stays
 * below it (why not fewer labs), else the plan's. Null for a plan for one lab.
 */
export function ceilingSentence(result: PlanResult, words: CeilingWords): string | null {
  if (!result.labCurves.length) return null
  const { outer, unit, targetPower } = words
  const perArm = result.design === 'one-arm' ? ' per arm' : ''
  if (result.labArmVariance === 0) {
    return `The effect is taken to be the same in every ${outer}, so nothing caps the power: more ${pluralOf(unit)} alone could reach any power.`
  }
  const own = result.labCurves.find((c) => c.labs === result.labs)
  const below =
    own && own.ceilingPower < targetPower
      ? own
      : result.labCurves.filter((c) => c.ceilingPower < targetPower && c.labs > 1).at(-1)
  const shown = below ?? own ?? result.labCurves.at(-1)!
  const why =
    result.design === 'one-arm'
      ? `${pluralOf(outer)} differ from each other`
      : `${pluralOf(outer)} differ in how strongly they respond`
  let sentence = `With ${count(shown.labs, outer)}${perArm}, no number of ${pluralOf(unit)} reaches more than ${percent(shown.ceilingPower)} power: ${why}.`
  if (below && result.fewestLabs !== null) {
    sentence += ` It takes at least ${count(result.fewestLabs, outer)}${perArm} to reach ${percent(targetPower)}.`
  }
  return sentence.charAt(0).toUpperCase() + sentence.slice(1)
}
