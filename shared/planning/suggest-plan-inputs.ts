import { contrastInterval } from '../report/contrast-interval'
import type { AnalysisResult } from '../schemas/analysis-result'
import { SINGLE_LAB, type PlanDefaults } from '../schemas/plans'
import { threeLevelComponents } from './three-level-components'

export type SuggestedPlan = Omit<PlanDefaults, 'source' | 'labId' | 'projectId'>

/**
 * Planning inputs suggested by a finished analysis, on three levels (threeLevelComponents): the
 * spread between units of one lab and arm and inside a unit (as two SDs), the outer level with its
 * number of units in the data as a fixed number of labs, and how much the effect differs between
 * labs (the SD of the difference between two arms from lab to lab, √(2 σ²_lab×arm); null when the
 * analysis did not estimate it, so the form asks). Null when the analysis found no variation
 * inside the labs (nothing to plan with).
 *
 * The difference to detect is left empty: it is the one that matters biologically, which only the
 * person planning can say. The observed difference (the first mixed-model contrast, with its
 * interval and p) comes along as a reference only: planning on an observed effect repeats its
 * chance error (a small, non-significant estimate gives a huge, needless experiment; a lucky large
 * one an underpowered one), which is the "post hoc power" trap (Hoenig & Heisey 2001, Am Stat
 * 55:19). Costs are left empty too: without them the plan counts units.
 */
export function suggestPlanInputs(result: AnalysisResult): SuggestedPlan | null {
  const components = threeLevelComponents(result)
  if (!components) return null
  const within = components.unitVariance + components.residualVariance
  if (!(within > 0)) return null
  const icc = components.unitVariance / within
  const contrast = result.comparisons.mixedModel?.contrasts[0] ?? null
  const { outer } = components
  const level = result.levels.find((l) => l.name === components.unitLevel)
  const conditions = Math.max(1, result.groups.length)
  const labs = outer?.nUnits ?? 1
  const multiLab = outer !== null && labs >= 2
  return {
    unitLevel: components.unitLevel,
    responseName: result.response,
    inputs: {
      icc,
      spread: {
        kind: 'components',
        sdBetween: Math.sqrt(components.unitVariance),
        sdWithin: Math.sqrt(components.residualVariance),
      },
      difference: null,
      alpha: 0.05,
      targetPower: 0.8,
      arms: Math.min(8, Math.max(2, result.groups.length)),
      costPerUnit: null,
      costPerObs: null,
      maxUnitsPerArm: null,
      maxObsPerUnit: null,
      outer: multiLab
        ? {
            name: outer.name,
            design: outer.design,
            minLabs: outer.design === 'one-arm' ? Math.max(2, Math.round(labs / conditions)) : labs,
            maxLabs: outer.design === 'one-arm' ? Math.max(2, Math.round(labs / conditions)) : labs,
            costPerLab: null,
            effectSd:
              outer.design === 'every-arm' && components.labArmVariance !== null
                ? Math.sqrt(2 * components.labArmVariance)
                : null,
            sdBetweenLabs:
              outer.design === 'one-arm'
                ? Math.sqrt(components.labVariance + (components.labArmVariance ?? 0))
                : null,
          }
        : SINGLE_LAB,
    },
    observedDifference: contrast ? contrast.estimate : null,
    observed: contrast
      ? {
          what: `${contrast.a} − ${contrast.b}`,
          estimate: contrast.estimate,
          ci: contrast.ci ?? contrastInterval(contrast.estimate, contrast.se, contrast.df),
          p: contrast.p,
        }
      : null,
    unitsInData: Math.round((level?.nUnits ?? 0) / conditions),
    meanObsPerUnit: level?.meanUnitSize ?? 0,
    outerLevel: multiLab ? outer.name : null,
    labsInData: multiLab ? labs : null,
    labArmVarianceSource: !multiLab
      ? 'not-needed'
      : outer.design === 'one-arm' || components.labArmVariance !== null
        ? 'analysis'
        : 'unknown',
    mapping: components.mapping,
  }
}
