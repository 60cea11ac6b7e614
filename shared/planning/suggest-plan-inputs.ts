import type { AnalysisResult } from '../schemas/analysis-result'
import type { PlanDefaults } from '../schemas/plans'
import { planUnitLevel } from './plan-unit-level'

export type SuggestedPlan = Omit<PlanDefaults, 'source' | 'labId' | 'projectId'>

/**
 * Planning inputs suggested by a finished analysis: the ICC of the level whose units carry the
 * condition (else the innermost level), the total SD from all variance components split into
 * between and within units, and the observed difference of the first mixed-model contrast.
 * Null when the analysis found no variation at all (nothing to plan with).
 */
export function suggestPlanInputs(result: AnalysisResult): SuggestedPlan | null {
  const unitLevel = planUnitLevel(result)
  const icc = result.icc.find((entry) => entry.level === unitLevel)?.icc ?? 0
  const variance = result.varianceComponents.reduce((sum, c) => sum + c.variance, 0)
  if (!(variance > 0)) return null
  const contrast = result.comparisons.mixedModel?.contrasts[0] ?? null
  const observed = contrast ? Math.abs(contrast.estimate) : null
  const level = result.levels.find((l) => l.name === unitLevel)
  const conditions = Math.max(1, result.groups.length)
  return {
    unitLevel,
    responseName: result.response,
    inputs: {
      icc,
      spread: {
        kind: 'components',
        sdBetween: Math.sqrt(icc * variance),
        sdWithin: Math.sqrt((1 - icc) * variance),
      },
      // Without an observed difference, half an SD is a common default, no source.
      difference: observed && observed > 0 ? observed : 0.5 * Math.sqrt(variance),
      alpha: 0.05,
      targetPower: 0.8,
      arms: Math.min(8, Math.max(2, result.groups.length)),
      costPerUnit: 100,
      costPerObs: 1,
      maxUnitsPerArm: null,
      maxObsPerUnit: null,
    },
    observedDifference: contrast ? contrast.estimate : null,
    unitsInData: Math.round((level?.nUnits ?? 0) / conditions),
    meanObsPerUnit: level?.meanUnitSize ?? 0,
  }
}
