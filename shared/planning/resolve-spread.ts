import type { PlanInputs } from '../schemas/plans'

/**
 * ICC and total SD a plan's inputs stand for: components win over the typed ICC when given.
 * Kept free of the statistics modules so the client can word a saved plan without loading them.
 */
export function resolveSpread(inputs: PlanInputs): { icc: number; sdTotal: number } {
  if (inputs.spread.kind === 'total') return { icc: inputs.icc, sdTotal: inputs.spread.sdTotal }
  const between = inputs.spread.sdBetween ** 2
  const within = inputs.spread.sdWithin ** 2
  return { icc: between / (between + within), sdTotal: Math.sqrt(between + within) }
}
