import type { AnalysisResult } from '../../../shared/schemas/analysis-result'
import { formatNumber } from '../../../shared/report/number-format'
import { formatCount } from '@/components/dataset/format'
import { unitAdequacy, type UnitAdequacy } from '@/components/dataset/unit-badge'

export interface Badge {
  id: string
  label: string
  value: string
  /** One sentence shown on hover. */
  explain: string
  /** Null: a count to read, not a judgement. */
  adequacy: UnitAdequacy | null
  detail?: string
}

/**
 * The headline numbers of a result, each with its one-line explanation. Colours follow the unit
 * rule (common practice, no source): fewer than 3 independent units in any arm is too few, 3–5
 * is thin, 6 or more is adequate; effective n per arm is judged on the same scale.
 */
export function resultBadges(result: AnalysisResult): Badge[] {
  const badges: Badge[] = [
    {
      id: 'observations',
      label: 'observations',
      value: formatCount(result.nObs),
      explain:
        'Rows that went into the analysis. They are not independent: rows from one unit resemble each other.',
      adequacy: null,
      detail: result.nDropped ? `${formatCount(result.nDropped)} left out for missing values` : undefined,
    },
  ]
  for (const level of result.levels) {
    const carriesCondition = level.name === result.conditionLevel
    const perArm = carriesCondition ? result.groups.map((g) => g.nUnits ?? 0) : []
    const fewest = perArm.length ? Math.min(...perArm) : null
    badges.push({
      id: `units-${level.name}`,
      label: `units of “${level.name}”`,
      value: formatCount(level.nUnits),
      explain: carriesCondition
        ? `Independent units: each “${level.name}” carries one condition, so comparisons count these, not the rows.`
        : `Units at the “${level.name}” level, ${formatNumber(level.meanUnitSize)} observations each on average.`,
      adequacy: fewest === null ? null : unitAdequacy(fewest),
      detail: carriesCondition
        ? `per arm: ${result.groups.map((g) => `${g.nUnits ?? 0} ${g.condition}`).join(' · ')}`
        : undefined,
    })
  }
  badges.push({
    id: 'design-effect',
    label: 'design effect',
    value: formatNumber(result.designEffect),
    explain:
      'How many times larger the variance of a mean is than if every observation were independent; it shrinks the usable sample size.',
    adequacy: null,
  })
  const perArmEffective = result.groups.map((g) => g.effectiveN)
  badges.push({
    id: 'effective-n',
    label: 'effective n',
    value: formatNumber(result.effectiveN),
    explain:
      'The number of independent observations the data are worth: observations divided by the design effect.',
    adequacy: unitAdequacy(Math.floor(Math.min(...perArmEffective))),
    detail:
      result.groups.length > 1
        ? `per arm: ${result.groups.map((g) => `${formatNumber(g.effectiveN)} ${g.condition}`).join(' · ')}`
        : undefined,
  })
  return badges
}
