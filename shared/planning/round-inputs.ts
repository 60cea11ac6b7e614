import type { PlanDraftInput } from '../schemas/plans'

const significant = (v: number, digits = 4) => Number(v.toPrecision(digits))
const maybe = (v: number | null | undefined) => (v === null || v === undefined ? v : significant(v))

/**
 * Numbers suggested by an analysis, rounded for the form: an estimate carries no more than three or
 * four meaningful digits, and 19.299919646047865 only looks more certain than it is.
 */
export function roundInputs<T extends PlanDraftInput>(inputs: T): T {
  const spread =
    inputs.spread.kind === 'total'
      ? { kind: 'total' as const, sdTotal: significant(inputs.spread.sdTotal) }
      : {
          kind: 'components' as const,
          sdBetween: significant(inputs.spread.sdBetween),
          sdWithin: significant(inputs.spread.sdWithin),
        }
  const outer = inputs.outer
    ? {
        ...inputs.outer,
        effectSd: maybe(inputs.outer.effectSd),
        sdBetweenLabs: maybe(inputs.outer.sdBetweenLabs),
      }
    : inputs.outer
  return {
    ...inputs,
    icc: Number(inputs.icc.toFixed(3)),
    spread,
    difference: inputs.difference === null ? null : significant(inputs.difference),
    ...(outer ? { outer } : {}),
  }
}
