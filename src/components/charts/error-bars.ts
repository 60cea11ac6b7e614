import type { ConditionBars, ErrorBarType } from '../../../shared/schemas/analyses'

export interface Bar {
  mean: number
  low: number
  high: number
}

export const ERROR_BAR_WORDS: Record<ErrorBarType, { short: string; long: string }> = {
  sem: { short: 'SEM', long: 'mean ± standard error of the mean' },
  sd: { short: 'SD', long: 'mean ± standard deviation' },
  ci95: { short: '95% CI', long: 'mean with its 95% confidence interval' },
}

/** The naive bar: every observation counted as independent. */
export function naiveBar(c: ConditionBars, type: ErrorBarType): Bar {
  const { estimate: mean, sd, se, ci } = c.naive
  if (type === 'sd') return { mean, low: mean - sd, high: mean + sd }
  if (type === 'ci95') return { mean, low: ci[0], high: ci[1] }
  return { mean, low: mean - se, high: mean + se }
}

/**
 * The nested bar: the model's mean with its SE or CI (Satterthwaite df), or the SD of unit means.
 * Null when the SD cannot be given (no level carries the condition, or a single unit).
 */
export function nestedBar(c: ConditionBars, type: ErrorBarType): Bar | null {
  const { estimate: mean, sd, se, ci } = c.nested
  if (type === 'sd') return sd === null ? null : { mean, low: mean - sd, high: mean + sd }
  if (type === 'ci95') return { mean, low: ci[0], high: ci[1] }
  return { mean, low: mean - se, high: mean + se }
}
