import type { EffectVariation, EngineWarning } from '../schemas/analysis-result'
import { formatNumber } from './number-format'
import { withUnit } from './response-unit'
import { factorWords, listWords, pluralOf } from './words'

/** Below this many units of a level, its level × condition variance is a rough estimate (issue 12; common practice). */
export const FEW_UNITS_FOR_EFFECT_SPREAD = 5

/** "The effect of treatment differs between labs by about 9.8 µm (SD)."; `source` is added in the brackets. */
export function effectVariationSentence(v: EffectVariation, unit: string | null, source?: string): string {
  const parts = v.factor.split(':')
  const what = parts.length > 1 ? `The combined effect of ${listWords(parts)}` : `The effect of ${v.factor}`
  return `${what} differs between ${pluralOf(v.level)} by about ${withUnit(formatNumber(v.effectSd), unit)} (SD${source ? `; ${source}` : ''}).`
}

/** How the SD is read, for the hover beside the sentence. */
export function effectVariationExplain(v: EffectVariation): string {
  return `From the “${v.level} × ${v.factor.split(':').join(' × ')}” variance (${formatNumber(v.variance)}): each ${v.level} has its own effect of ${factorWords(v.factor)}, and √(2 × variance) is the typical spread of that effect from one ${v.level} to the next.`
}

/**
 * The caution when the spread rests on few units: the comparison of this factor is then judged
 * against the differences between those few units, so it has about (units − 1) df.
 */
export function fewUnitsCaution(v: EffectVariation): string | null {
  if (v.nUnits >= FEW_UNITS_FOR_EFFECT_SPREAD) return null
  const units = `${v.nUnits} ${v.nUnits === 1 ? v.level : pluralOf(v.level)}`
  return `This spread rests on only ${units}, so it is a rough estimate, and the comparison of ${factorWords(v.factor)} then has only about ${Math.max(v.nUnits - 1, 0)} degrees of freedom for a difference of two levels, whatever the number of observations.`
}

/**
 * The engine's own warnings about one level × condition term: those naming the term
 * ("lab:treatment", as a whole name: not inside "lab:treatment:dose"). They are shown beside the
 * sentence, and left out of the general list so nothing is said twice.
 */
export function warningsAbout(v: EffectVariation, warnings: readonly EngineWarning[]): EngineWarning[] {
  const escaped = v.term.replace(/[.*+?^${}()|[\]\\]/g, '\\$&')
  const named = new RegExp(`(^|[^\\w:])${escaped}($|[^\\w:])`)
  return warnings.filter((w) => named.test(w.message))
}
