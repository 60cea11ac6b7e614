import type { AnalysisResult } from '../../../shared/schemas/analysis-result'
import { glmmFamily, ratioName } from '../../../shared/report/family-words'
import { formatNumber } from '../../../shared/report/number-format'
import { formatCount } from '@/components/dataset/format'
import { ADEQUACY_RULE, adequacyLook, unitAdequacy, type UnitAdequacy } from '@/components/dataset/unit-badge'

/** A line under a badge's number, with its own one-sentence hover when it needs one. */
export interface BadgeDetail {
  id: string
  text: string
  explain?: string
}

export interface Badge {
  id: string
  label: string
  value: string
  /** One sentence shown on hover. */
  explain: string
  /** Null: a count to read, not a judgement. */
  adequacy: UnitAdequacy | null
  /** What the colour means, in words (null without a colour). */
  adequacyWords: string | null
  /** True where the colour is the unit rule: the badge says it is no power check and offers the planner. */
  powerNote: boolean
  details: BadgeDetail[]
}

/** The line under a coloured unit count: where the rule comes from and what it does not say. */
export const POWER_NOTE: BadgeDetail = {
  id: 'rule',
  text: 'common practice; not a power check',
  explain: ADEQUACY_RULE,
}

/** Per-arm effective n are for each arm's mean; why they do not sum to the comparison's. */
export function perArmExplain(arm: string): string {
  return `Each ${arm}’s effective n is for that ${arm}’s mean alone; a comparison’s variance combines two ${arm}s and loses the variance they share (such as lab-to-lab differences when every lab runs both), so these numbers do not add up to the comparison’s.`
}

/** The quantity the headline design effect belongs to: a contrast of engine ≥ 0.2, else the overall mean. */
function headlineOf(result: AnalysisResult) {
  if (result.headline) return result.headline
  return { label: 'mean', designEffect: result.designEffect, effectiveN: result.effectiveN }
}

function forWhat(label: string, result?: AnalysisResult): string {
  const family = result ? glmmFamily(result) : null
  if (label === 'mean')
    return family
      ? `for the overall ${family === 'binomial' ? 'proportion' : 'rate'} (on the log scale)`
      : 'for the mean of all observations'
  return family ? `for ${label} (its log ${ratioName(family)})` : `for ${label}`
}

function unitBadges(result: AnalysisResult): Badge[] {
  const cells = result.groups.some((g) => g.factorLevels)
  return result.levels.map((level) => {
    const carriesCondition = level.name === result.conditionLevel
    const perArm = carriesCondition ? result.groups.map((g) => g.nUnits ?? 0) : []
    const fewest = perArm.length ? Math.min(...perArm) : null
    const what = cells ? 'design cell' : 'condition'
    return {
      id: `units-${level.name}`,
      label: `units of “${level.name}”`,
      value: formatCount(level.nUnits),
      explain: carriesCondition
        ? `Independent units: each “${level.name}” carries one ${what}, so comparisons count these, not the rows.`
        : `Units at the “${level.name}” level, ${formatNumber(level.meanUnitSize)} observations each on average.`,
      adequacy: fewest === null ? null : unitAdequacy(fewest),
      adequacyWords: fewest === null ? null : adequacyLook[unitAdequacy(fewest)].words,
      powerNote: fewest !== null,
      details: carriesCondition
        ? [
            {
              id: 'per-arm',
              text: `${cells ? 'per design cell' : 'per arm'}: ${result.groups.map((g) => `${g.nUnits ?? 0} ${g.condition}`).join(' · ')}`,
            },
            POWER_NOTE,
          ]
        : [],
    }
  })
}

/**
 * The headline numbers of a result, each with its one-line explanation. Design effect and
 * effective n belong to one quantity (the first comparison of the first factor, or the overall
 * mean) and say which; per-arm values say they are for each arm's mean and why they do not add up.
 * Colours follow the unit rule (common practice, no source): fewer than 3 independent units in
 * any arm is too few, 3–5 is thin, 6 or more is adequate; effective n per arm on the same scale.
 */
export function resultBadges(result: AnalysisResult): Badge[] {
  const headline = headlineOf(result)
  const isMean = headline.label === 'mean'
  const family = glmmFamily(result)
  const quantity = family
    ? forWhat(headline.label, result).replace(/^for /, '')
    : isMean
      ? 'the mean of all observations'
      : headline.label
  const observationsBehind = Math.round(headline.effectiveN * headline.designEffect)
  const perArmEffective = result.groups.map((g) => g.effectiveN)
  const arm = result.groups.some((g) => g.factorLevels) ? 'design cell' : 'arm'
  const effectiveAdequacy = unitAdequacy(Math.floor(Math.min(...perArmEffective)))
  return [
    {
      id: 'observations',
      label: 'observations',
      value: formatCount(result.nObs),
      explain:
        'Rows that went into the analysis. They are not independent: rows from one unit resemble each other.',
      adequacy: null,
      adequacyWords: null,
      powerNote: false,
      details: result.nDropped
        ? [{ id: 'dropped', text: `${formatCount(result.nDropped)} left out for missing values` }]
        : [],
    },
    ...unitBadges(result),
    {
      id: 'design-effect',
      label: 'design effect',
      value: formatNumber(headline.designEffect),
      explain: `How many times larger the variance of ${quantity} is under the model than if every observation were independent${isMean ? '' : '; variance that both sides share cancels out of a difference'}.`,
      adequacy: null,
      adequacyWords: null,
      powerNote: false,
      details: [{ id: 'quantity', text: forWhat(headline.label, result) }],
    },
    {
      id: 'effective-n',
      label: 'effective n',
      value: formatNumber(headline.effectiveN),
      explain: `The number of independent observations ${quantity} is worth: its observations divided by its design effect.`,
      adequacy: effectiveAdequacy,
      adequacyWords: `smallest ${arm}: ${adequacyLook[effectiveAdequacy].short}, on the units’ scale`,
      powerNote: false,
      details: [
        {
          id: 'quantity',
          text: `${forWhat(headline.label, result)}: ${formatCount(observationsBehind)} observations ÷ ${formatNumber(headline.designEffect)}`,
        },
        ...(result.groups.length > 1
          ? [
              {
                id: 'per-arm',
                text: `for each ${arm}’s mean: ${result.groups.map((g) => `${formatNumber(g.effectiveN)} ${g.condition}`).join(' · ')}`,
                explain: perArmExplain(arm),
              },
            ]
          : []),
      ],
    },
  ]
}
