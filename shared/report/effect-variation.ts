import type { EffectVariation, EngineWarning } from '../schemas/analysis-result'
import { formatNumber } from './number-format'
import { withUnit } from './response-unit'
import { factorWords, listWords, pluralOf } from './words'

/** Below this many units of a level, its level × condition variance is a rough estimate (issue 12; common practice). */
export const FEW_UNITS_FOR_EFFECT_SPREAD = 5

/**
 * "The effect of treatment differs between labs by about 9.8 µm (SD)."; `source` is added in the
 * brackets. A variance estimated as 0 (a boundary fit) is said as such, not as "about 0 µm".
 */
export function effectVariationSentence(v: EffectVariation, unit: string | null, source?: string): string {
  const parts = v.factor.split(':')
  const what = parts.length > 1 ? `The combined effect of ${listWords(parts)}` : `The effect of ${v.factor}`
  const also = source ? `; ${source}` : ''
  if (v.effectSd === 0)
    return `${what} shows no measurable difference between ${pluralOf(v.level)} here (SD estimated as 0${also}).`
  return `${what} differs between ${pluralOf(v.level)} by about ${withUnit(formatNumber(v.effectSd), unit)} (SD${also}).`
}

/** How the SD is read, for the hover beside the sentence. */
export function effectVariationExplain(v: EffectVariation): string {
  return `From the “${v.level} × ${v.factor.split(':').join(' × ')}” variance (${formatNumber(v.variance)}): each ${v.level} has its own effect of ${factorWords(v.factor)}, and √(2 × variance) is the typical spread of that effect from one ${v.level} to the next.`
}

/**
 * The caution when the spread rests on few units: the comparison of this factor is then judged
 * against the differences between those few units, so it has about (units − 1) df. A binary or
 * count model's Wald test (`wald`) has no df to shrink, so it is said to be too optimistic instead.
 */
export function fewUnitsCaution(v: EffectVariation, wald = false): string | null {
  if (v.nUnits >= FEW_UNITS_FOR_EFFECT_SPREAD) return null
  const units = `${v.nUnits} ${v.nUnits === 1 ? v.level : pluralOf(v.level)}`
  if (wald)
    return `This spread rests on only ${units}, so it is a rough estimate; the Wald test of ${factorWords(v.factor)} uses the normal distribution as if it were known exactly, so with so few ${pluralOf(v.level)} its p-value is too optimistic.`
  return `This spread rests on only ${units}, so it is a rough estimate, and the comparison of ${factorWords(v.factor)} then has only about ${Math.max(v.nUnits - 1, 0)} degrees of freedom for a difference of two levels, whatever the number of observations.`
}

/**
 * The engine's own warnings about one level × condition term: those naming this term (as a whole
 * name: "lab:treatment" is not inside "lab:treatment:dose") and no other such term, so a warning
 * about several terms stays in the general list. They are shown beside the sentence, and left out
 * of the general list so nothing is said twice.
 */
export function warningsAbout(
  v: EffectVariation,
  warnings: readonly EngineWarning[],
  allTerms: readonly string[] = [v.term],
): EngineWarning[] {
  const names = (term: string) => {
    const escaped = term.replace(/[.*+?^${}()|[\]\\]/g, '\\$&')
    return new RegExp(`(^|[^\\w:])${escaped}($|[^\\w:])`)
  }
  const others = allTerms.filter((t) => t !== v.term).map(names)
  const mine = names(v.term)
  return warnings.filter((w) => mine.test(w.message) && !others.some((other) => other.test(w.message)))
}
