import { contrastInterval } from '../report/contrast-interval'
import { isWald, type AnalysisResult } from '../schemas/analysis-result'
import { SINGLE_LAB, type PlanDefaults, type PlanInputs } from '../schemas/plans'
import { resolveSpread } from './resolve-spread'
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
  const glmm = glmmMeasure(result, components)
  const { outer } = components
  const level = result.levels.find((l) => l.name === components.unitLevel)
  // A binary or count plan uses the ICC and SD on the response scale (here at the control arm,
  // until the person gives the difference); stored as such, so a plan never shows latent-scale
  // numbers as if they were in the response's unit.
  const observedScale = glmm ? resolveSpread({ difference: 0, measure: glmm.measure } as PlanInputs) : null
  const conditions = Math.max(1, result.groups.length)
  const labs = outer?.nUnits ?? 1
  const multiLab = outer !== null && labs >= 2
  return {
    unitLevel: components.unitLevel,
    responseName: result.response,
    inputs: {
      icc: observedScale?.icc ?? icc,
      spread: observedScale
        ? { kind: 'total', sdTotal: observedScale.sdTotal }
        : {
            kind: 'components',
            sdBetween: Math.sqrt(components.unitVariance),
            sdWithin: Math.sqrt(components.residualVariance),
          },
      difference: null,
      measure: glmm ? glmm.measure : { kind: 'mean' },
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
            // A binary or count model's lab variances are on the latent scale: scaled to the
            // response scale at the control arm by the link's slope (the delta method).
            effectSd:
              outer.design === 'every-arm' && components.labArmVariance !== null
                ? (glmm?.slope ?? 1) * Math.sqrt(2 * components.labArmVariance)
                : null,
            sdBetweenLabs:
              outer.design === 'one-arm'
                ? (glmm?.slope ?? 1) * Math.sqrt(components.labVariance + (components.labArmVariance ?? 0))
                : null,
          }
        : SINGLE_LAB,
    },
    // A binary or count contrast is a ratio on the link scale, not a difference of proportions or
    // rates: the plain difference of its two arms stands in, with the model's p.
    observed: !contrast
      ? null
      : isWald(contrast)
        ? glmm?.observed
          ? { what: glmm.observed.what, estimate: glmm.observed.difference, ci: null, p: contrast.p }
          : null
        : {
            what: `${contrast.a} − ${contrast.b}`,
            estimate: contrast.estimate,
            ci: contrast.ci ?? contrastInterval(contrast.estimate, contrast.se, contrast.df),
            p: contrast.p,
          },
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

/**
 * A yes/no or count analysis planned on its own scale: the control arm's plain proportion (or
 * rate) — the lower of the first contrast's two arms —, the latent ICC of the units (their latent
 * variance over itself plus everything within a unit: deeper levels and the latent residual,
 * re-taken at the control rate for counts), the plain difference between those two arms (a
 * reference only), and the link's slope at the control arm for lab-level SDs. Null for a normal
 * response.
 */
function glmmMeasure(
  result: AnalysisResult,
  components: NonNullable<ReturnType<typeof threeLevelComponents>>,
) {
  const family = result.family
  if (family !== 'binomial' && family !== 'poisson') return null
  const reference = result.groups.find((g) => g.condition === result.reference) ?? result.groups[0]
  const contrast = result.comparisons.mixedModel?.contrasts[0] ?? null
  const other = contrast
    ? result.groups.find(
        (g) => g.condition === (contrast.b === reference.condition ? contrast.a : contrast.b),
      )
    : undefined
  const observedDifference = other ? other.mean - reference.mean : null
  const measureWord = family === 'binomial' ? 'proportions' : 'rates'
  const observed =
    other && observedDifference !== null
      ? {
          what: `${other.condition} − ${reference.condition} (plain ${measureWord} of all observations)`,
          difference: observedDifference,
        }
      : null
  // A plan runs from its lower arm up by the difference; a decrease is planned alike (the pooled
  // variance at the average is the same either way), so the lower arm's value stands first.
  const lower = other && observedDifference !== null && observedDifference < 0 ? other.mean : reference.mean
  if (family === 'binomial') {
    // The plan needs a proportion strictly inside (0, 1).
    const control = Math.min(0.99, Math.max(0.01, lower))
    const latentIcc = components.unitVariance / (components.unitVariance + components.residualVariance)
    return {
      measure: { kind: 'proportion' as const, control, latentIcc: Math.min(latentIcc, 0.99) },
      observed,
      slope: control * (1 - control),
    }
  }
  const control = Math.max(0.01, lower)
  // The analysis's latent residual was taken at its own mean count; the plan's at the control rate.
  const latentResidual = result.varianceComponents.find((c) => c.level === 'residual')?.variance ?? 0
  const deeper = Math.max(0, components.residualVariance - latentResidual)
  const latentIcc = components.unitVariance / (components.unitVariance + deeper + Math.log1p(1 / control))
  return {
    measure: { kind: 'rate' as const, control, latentIcc: Math.min(latentIcc, 0.99) },
    observed,
    slope: control,
  }
}
