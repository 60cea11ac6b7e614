import type { AnalysisResult, EngineWarning } from '../../../shared/schemas/analysis-result'
import {
  effectVariationExplain,
  effectVariationSentence,
  fewUnitsCaution,
  warningsAbout,
} from '../../../shared/report/effect-variation'
import { glmmFamily, linkScaleName } from '../../../shared/report/family-words'
import { responseUnit } from '../../../shared/report/response-unit'

export interface EffectVariationItem {
  term: string
  sentence: string
  explain: string
  /** The engine's own warnings about this term, shown here and not again in the general list. */
  warnings: EngineWarning[]
  /** Our caution about few units, only when the engine said nothing about this term. */
  caution: string | null
}

/** What the page says about each level × condition term; empty for engine 0.1 results. */
export function effectVariationItems(result: AnalysisResult): EffectVariationItem[] {
  // A binary or count model's effects differ on its link scale, never in the response's units.
  const family = glmmFamily(result)
  const unit = family ? `on the ${linkScaleName(family)} scale` : responseUnit(result.response)
  const terms = (result.effectVariation ?? []).map((v) => v.term)
  return (result.effectVariation ?? []).map((v) => {
    const warnings = warningsAbout(v, result.warnings, terms)
    return {
      term: v.term,
      sentence: effectVariationSentence(v, unit),
      explain: effectVariationExplain(v),
      warnings,
      caution: warnings.length ? null : fewUnitsCaution(v, family !== null),
    }
  })
}

/** The warnings left for the general list once those shown beside the effect variation are taken out. */
export function generalWarnings(result: AnalysisResult): { shown: EngineWarning[]; placedElsewhere: number } {
  const placed = new Set(effectVariationItems(result).flatMap((item) => item.warnings))
  return { shown: result.warnings.filter((w) => !placed.has(w)), placedElsewhere: placed.size }
}
