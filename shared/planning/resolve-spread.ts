import type { PlanInputs } from '../schemas/plans'
import { observedScaleIcc } from '../stats/observed-scale-icc'

/** Latent residual of the logit link, π²/3 (Nakagawa, Johnson & Schielzeth 2017). */
const LOGIT_RESIDUAL = (Math.PI * Math.PI) / 3

/**
 * ICC and total SD a plan's inputs stand for: components win over the typed ICC when given.
 * Kept free of the heavier statistics modules so the client can word a saved plan without them
 * (observedScaleIcc is a few lines of arithmetic).
 *
 * Proportion and rate plans: the unit variance on the latent scale follows from the latent ICC
 * (σ²_u = ρ · R / (1 − ρ), R = π²/3 for the logit link, ln(1 + 1/λ₀) at the control rate for the
 * log link; Nakagawa, Johnson & Schielzeth 2017), and the ICC and SD of one observation on the
 * response scale are taken at the average of the two arms, (control + target) / 2, by
 * observedScaleIcc. The planner then uses the design effect 1 + (m − 1)ρ with that pooled
 * variance, the usual approximation for a difference in proportions between clusters (Donner &
 * Klar 2000, Design and Analysis of Cluster Randomization Trials in Health Research, ch. 5).
 */
export function resolveSpread(inputs: PlanInputs): { icc: number; sdTotal: number } {
  const measure = inputs.measure ?? { kind: 'mean' }
  if (measure.kind !== 'mean') {
    const average = measure.control + inputs.difference / 2
    const residual = measure.kind === 'proportion' ? LOGIT_RESIDUAL : Math.log1p(1 / measure.control)
    const unitVariance = (measure.latentIcc * residual) / (1 - measure.latentIcc)
    const { icc, sdTotal } = observedScaleIcc({
      link: measure.kind === 'proportion' ? 'logit' : 'log',
      mean: average,
      unitVariance,
    })
    return { icc, sdTotal }
  }
  if (inputs.spread.kind === 'total') return { icc: inputs.icc, sdTotal: inputs.spread.sdTotal }
  const between = inputs.spread.sdBetween ** 2
  const within = inputs.spread.sdWithin ** 2
  return { icc: between / (between + within), sdTotal: Math.sqrt(between + within) }
}
