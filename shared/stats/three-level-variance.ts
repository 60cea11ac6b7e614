import { EngineInputError } from './engine-input-error'
import { checkThreeLevelVariances } from './planning/check-three-level-variances'
import type { LabDesign, ThreeLevelVariances } from './planning/three-level-variances'

export type { LabDesign, ThreeLevelVariances } from './planning/three-level-variances'

export interface ThreeLevelDesign {
  /** Default 'every-arm'. */
  design?: LabDesign
  /** L: labs ('every-arm') or labs per arm ('one-arm'); a whole number. */
  labs: number
  /** k: units per lab and arm (≥ 1; ≥ 2 with a single lab); may be fractional for a root finder. */
  unitsPerLabArm: number
  /** m: observations per unit (≥ 1); may be fractional. */
  obsPerUnit: number
}

export type ThreeLevelVarianceInput = ThreeLevelDesign & ThreeLevelVariances

export interface ThreeLevelVarianceResult {
  /** Variance of the estimated difference between two arm means. */
  variance: number
  /** Degrees of freedom of its t test. */
  df: number
  /** The variance as units and observations grow without bound (k, m → ∞): only more labs lower it. */
  ceilingVariance: number
  /** σ²_unit + σ²_resid / m: the variance of one unit's mean. */
  unitMeanVariance: number
}

/**
 * Variance and degrees of freedom of the difference between two arm means in a three-level
 * design: L labs, k units per lab and arm, m observations per unit, under the model
 *   y = μ + arm + lab + lab×arm + unit + residual,
 * random parts with variances σ²_lab, σ²_lab×arm, σ²_unit, σ²_resid (lme4:
 * `y ~ arm + (1|lab) + (1|lab:arm) + (1|lab:unit)`).
 *
 * Every lab runs every arm (multisite):
 *   Var = (2σ²_lab×arm + 2(σ²_unit + σ²_resid/m)/k) / L,   df = L − 1.
 * σ²_lab cancels: each lab is compared with itself. This is Raudenbush & Liu (2000, Psychol
 * Methods 5:199, "Statistical power and optimal design for multisite randomized trials"), whose
 * two-level model has n persons per site and Var = (τ + 4σ²/n)/J with J sites, τ the variance
 * of the sites' treatment effects and σ² the person-level variance. Here a site's effect is the
 * difference of two lab×arm intercepts, so τ = 2σ²_lab×arm; n = 2k; and a person is replaced by a
 * unit whose mean carries σ²_unit + σ²_resid/m (the unit level added to their model). df = L − 1
 * is their test of the average effect, F(1, L − 1) = t²: with balanced data it is exactly the t
 * test of the L within-lab differences, which is also the test of the maximal mixed model
 * whenever σ²_lab×arm is estimated above 0. If the fitted model puts σ²_lab×arm at 0 it pools
 * degrees of freedom and gains a little power, so L − 1 is on the safe side.
 * With more than two arms this is each pairwise comparison, still with L − 1 df (the maximal
 * model pools (L − 1)(arms − 1); L − 1 is conservative, as clusterPower's 2(k − 1)).
 *
 * One lab (L = 1): the lab×arm part cannot be told apart from the effect itself, so it must be
 * 0 and the plan is about this lab only: Var = 2(σ²_unit + σ²_resid/m)/k with df = 2(k − 1),
 * exactly the two-level cluster formula of clusterPower (ρ = σ²_unit / (σ²_unit + σ²_resid)).
 *
 * Each lab runs one arm, L labs per arm (the lab carries the condition, a three-level cluster
 * randomised design; σ²_lab no longer cancels and σ²_lab×arm cannot be told apart from it):
 *   Var = 2(σ²_lab + σ²_lab×arm + (σ²_unit + σ²_resid/m)/k) / L,   df = 2(L − 1)
 * (the three-level cluster randomised trial of Heo & Leon 2008, Biometrics 64:1256, and
 * Konstantopoulos 2008, J Res Educ Eff 1:66, both from memory; df of the t test on the 2L lab
 * means, as Konstantopoulos's noncentral t).
 *
 * Guard errors: an unknown design; L not a whole number ≥ 1 (≥ 2 for 'one-arm'); k < 1, or
 * k < 2 with one lab; m < 1; a variance that is negative or not finite; σ²_lab×arm > 0 with one
 * lab; a design whose variance is 0 (nothing varies).
 *
 * @example
 * threeLevelVariance({ labs: 4, unitsPerLabArm: 5, obsPerUnit: 20, labArmVariance: 2, unitVariance: 20, residualVariance: 100 })
 * // → { variance: 3.5, df: 3, ceilingVariance: 1, unitMeanVariance: 25 }
 */
export function threeLevelVariance(input: ThreeLevelVarianceInput): ThreeLevelVarianceResult {
  const { labs: L, unitsPerLabArm: k, obsPerUnit: m } = input ?? ({} as ThreeLevelVarianceInput)
  const design = input?.design ?? 'every-arm'
  if (design !== 'every-arm' && design !== 'one-arm') {
    throw new EngineInputError(`threeLevelVariance: unknown design "${String(design)}"`)
  }
  const minLabs = design === 'one-arm' ? 2 : 1
  if (typeof L !== 'number' || !Number.isInteger(L) || L < minLabs) {
    throw new EngineInputError(
      design === 'one-arm'
        ? `threeLevelVariance: with each lab running one arm, at least 2 labs per arm are needed, got ${L}`
        : `threeLevelVariance requires a whole number of labs, at least 1, got ${L}`,
    )
  }
  const minUnits = design === 'every-arm' && L === 1 ? 2 : 1
  if (typeof k !== 'number' || !Number.isFinite(k) || k < minUnits) {
    throw new EngineInputError(
      minUnits === 2
        ? `threeLevelVariance: with one lab, at least 2 units per arm are needed, got ${k}`
        : `threeLevelVariance requires at least one unit per lab and arm, got ${k}`,
    )
  }
  if (typeof m !== 'number' || !Number.isFinite(m) || m < 1) {
    throw new EngineInputError(`threeLevelVariance requires at least one observation per unit, got ${m}`)
  }
  const { labArmVariance, labVariance, unitVariance, residualVariance } = checkThreeLevelVariances(
    input,
    'threeLevelVariance',
  )
  if (design === 'every-arm' && L === 1 && labArmVariance > 0) {
    throw new EngineInputError(
      'threeLevelVariance: with one lab, how much labs differ in their response cannot be told apart from the effect; plan for at least 2 labs, or set the lab × condition variance to 0 to plan for this lab alone',
    )
  }
  const unitMeanVariance = unitVariance + residualVariance / m
  let variance: number
  let ceilingVariance: number
  let df: number
  if (design === 'one-arm') {
    const between = labVariance + labArmVariance
    variance = (2 * (between + unitMeanVariance / k)) / L
    ceilingVariance = (2 * between) / L
    df = 2 * (L - 1)
  } else if (L === 1) {
    variance = (2 * unitMeanVariance) / k
    ceilingVariance = 0
    df = 2 * (k - 1)
  } else {
    variance = (2 * labArmVariance + (2 * unitMeanVariance) / k) / L
    ceilingVariance = (2 * labArmVariance) / L
    df = L - 1
  }
  if (!(variance > 0)) {
    throw new EngineInputError(
      'threeLevelVariance: every variance is 0, so the difference would be known exactly; give the spread of the observations',
    )
  }
  return { variance, df, ceilingVariance, unitMeanVariance }
}
