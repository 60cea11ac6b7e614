import type { PlanInputs, PlanLabDesign } from '../schemas/plans'
import { resolveSpread } from './resolve-spread'

export interface ResolvedLevels {
  design: PlanLabDesign
  /** σ²_lab×arm: half the square of the effect's SD between labs ('every-arm'); 0 for 'one-arm'. */
  labArmVariance: number
  /** σ²_lab + σ²_lab×arm as one ('one-arm' only, where the two cannot be told apart); else 0. */
  labVariance: number
  /** σ²_unit = ICC · SD² and σ²_resid = (1 − ICC) · SD², inside a lab and arm. */
  unitVariance: number
  residualVariance: number
  icc: number
  sdTotal: number
  /** True when more than one lab is planned and the lab-level spread was not given (planned as 0). */
  assumed: boolean
  /** True when the plan spans more than one lab (or one arm per lab). */
  multiLab: boolean
}

/**
 * The variances a plan's inputs stand for, on the three levels. The effect's SD between labs is
 * the SD of the difference between two arms from one lab to the next, so σ²_lab×arm = SD² / 2
 * (the difference of two independent lab × arm intercepts has twice their variance). Free of the
 * statistics modules, like resolveSpread, so the client can word a plan without loading them.
 */
export function resolveLevels(inputs: PlanInputs): ResolvedLevels {
  const { icc, sdTotal } = resolveSpread(inputs)
  const { outer } = inputs
  const multiLab = outer.design === 'one-arm' || outer.maxLabs > 1
  const variance = sdTotal * sdTotal
  const base = {
    design: outer.design,
    unitVariance: icc * variance,
    residualVariance: (1 - icc) * variance,
    icc,
    sdTotal,
    multiLab,
  }
  if (outer.design === 'one-arm') {
    const sd = outer.sdBetweenLabs
    return { ...base, labArmVariance: 0, labVariance: (sd ?? 0) ** 2, assumed: sd === null }
  }
  const sd = outer.effectSd
  return {
    ...base,
    labArmVariance: multiLab ? (sd ?? 0) ** 2 / 2 : 0,
    labVariance: 0,
    assumed: multiLab && sd === null,
  }
}
