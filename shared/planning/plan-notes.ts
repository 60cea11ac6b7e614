import type { PlanRemark } from '../stats/planning/plan-remark'

/** The outer level's name, singular and plural ("day", "days"). */
export interface LabWords {
  one: string
  many: string
}

/** 0.8 → "80 %", 0.533 → "53 %" (whole percentage points, as the planner shows power). */
function asPercent(p: number): string {
  return `${Math.round(p * 100)} %`
}

/** One remark of a design search as the sentence the planner shows. */
function sentence(remark: PlanRemark, word: LabWords): string {
  const labsWord = (n: number) => (n === 1 ? word.one : word.many)
  switch (remark.code) {
    case 'cost-optimum':
      return remark.note
    case 'obs-search-range':
      return `${remark.why === 'no-costs' ? 'Without costs, observations' : 'Observations'} per unit were searched up to ${remark.upTo}; set a limit to search a different range.`
    case 'labs-start-at-two':
      return remark.design === 'one-arm'
        ? `With one ${word.one} per arm the ${word.many} cannot be compared with each other, so the search starts at 2 ${word.many} per arm.`
        : `With one ${word.one}, how much ${word.many} differ in their response cannot be measured, so the search starts at 2 ${word.many}.`
    case 'units-limit-binds':
      return `The limit on units per ${word.one} and arm is binding.`
    case 'obs-limit-binds':
      return 'The limit on observations per unit is binding.'
    case 'labs-limit-binds':
      return `The largest number of ${word.many} allowed is binding.`
    case 'limits-fall-short': {
      const { labs, unitsPerLabArm, obsPerUnit, target, bestPower } = remark
      return `No design within ${labs} ${labsWord(labs)}, ${unitsPerLabArm} units per ${word.one} and arm and ${obsPerUnit} observations per unit reaches ${asPercent(target)} power; the most powerful one reaches ${asPercent(bestPower)}.`
    }
    case 'ceiling-falls-short': {
      const { labs, target, ceiling, fewestLabs } = remark
      const why = remark.design === 'one-arm' ? 'from each other' : 'in how strongly they respond'
      const fewest = fewestLabs === null ? '' : ` It takes at least ${fewestLabs} ${labsWord(fewestLabs)}.`
      const shown = remark.shown === 'cheapest' ? 'the cheapest design' : 'the fewest units'
      return `No design with at most ${labs} ${labsWord(labs)} reaches ${asPercent(target)} power: with ${labs} ${labsWord(labs)} no number of units gets past ${asPercent(ceiling)}, because ${word.many} differ ${why}.${fewest} Shown: ${shown} within 2 points of that limit.`
    }
    case 'pairwise-bonferroni':
      return `With ${remark.arms} arms the power is that of each pairwise comparison at the Bonferroni level ${remark.alphaPerComparison.toPrecision(3)}.`
  }
}

/**
 * The notes of a design search (planFewestUnits, planThreeLevel) in plain words, in the outer
 * level's own name: the library returns what it found as codes and numbers, the planner says it.
 */
export function planNotes(remarks: PlanRemark[], word: LabWords = { one: 'lab', many: 'labs' }): string[] {
  return remarks.map((remark) => sentence(remark, word))
}
