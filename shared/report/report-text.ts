import type { AnalysisSettings } from '../schemas/analyses'
import { isWald, type AnalysisResult, type MixedModelContrast } from '../schemas/analysis-result'
import { contrastInterval } from './contrast-interval'
import { glmmFamily } from './family-words'
import { glmmMethodsParagraph, glmmResultsSentence } from './glmm-report-text'
import { formatDf, formatInterval, formatNumber, formatP } from './number-format'
import {
  adjustedFor,
  effectVariationSentences,
  factorsDescription,
  formulaSentence,
  levelsDescription,
  simpleEffectsSentence,
  slopesSentence,
  termsMethodSentence,
  termsResultSentence,
  unitsCheckSentence,
} from './report-parts'
import { listWords } from './words'

/**
 * The "How to report this" text: a methods paragraph and a results sentence that count the
 * independent units (not the observations), name the model, the df method and the software.
 * Pure: the same result always gives the same words, so the text can be tested and reused. What
 * engine ≥ 0.2 adds (two factors, covariates, formula, type III tests, level × condition
 * variances) comes from report-parts; without those fields the words are those of engine 0.1.
 * Binary and count responses (result.family binomial or poisson) have words of their own
 * (glmm-report-text): odds or rate ratios, Wald tests, the latent scale.
 */

export interface ReportContext {
  result: AnalysisResult
  /** `trials` (engine ≥ 0.3 settings): a binomial response given as successes out of this column. */
  settings: Pick<AnalysisSettings, 'bootstrap'> & Partial<Pick<AnalysisSettings, 'trials'>>
  /** Name and version of the program, e.g. "Nestwise 0.1.0". */
  software: string
}

export interface ReportText {
  methods: string
  results: string
}

const present = (items: (string | null)[]): string[] => items.filter((s): s is string => s !== null)

/** Units of the condition level per condition: "5 vehicle and 5 NW-117 mice"-style counts. */
function unitsPerCondition(result: AnalysisResult): string | null {
  if (!result.conditionLevel) return null
  const parts = result.groups.map((g) => `${g.nUnits ?? '?'} (${g.condition})`)
  return `n = ${parts.join(', ')} units of “${result.conditionLevel}”`
}

function modelSentence(result: AnalysisResult): string {
  const subject = `“${result.response}”`
  const model = `a linear mixed model fitted by REML${adjustedFor(result)}, with ${levelsDescription(result)}`
  const factors = factorsDescription(result)
  if (factors)
    return `${subject} was compared between the design cells of ${factors}, crossed with their interaction, with ${model}.`
  if (result.condition) {
    const conditions = result.groups.map((g) => g.condition)
    return `${subject} was compared between the conditions of “${result.condition}” (${listWords(conditions)}; reference ${result.reference}) with ${model}.`
  }
  return `The mean of ${subject} was estimated with ${model}; degrees of freedom used the Satterthwaite approximation.`
}

function dfSentence(result: AnalysisResult): string | null {
  const terms = termsMethodSentence(result)
  if (terms) return terms
  if (!result.condition) return null
  return result.groups.length > 2
    ? 'Degrees of freedom used the Satterthwaite approximation; the overall difference was tested with an F test and pairwise differences were Holm-adjusted.'
    : 'Degrees of freedom used the Satterthwaite approximation.'
}

/**
 * Engine 0.1 (no headline): " (design effect 17.5, effective n 23.5)" inside the units sentence.
 * Engine ≥ 0.2 says which quantity they belong to in a sentence of its own, since its label may
 * hold brackets of its own ("KO − WT (averaged over treatment)").
 */
function tableDesignEffect(result: AnalysisResult): string {
  if (result.headline) return ''
  return ` (design effect ${formatNumber(result.designEffect)}, effective n ${formatNumber(result.effectiveN)})`
}

function headlineSentence(result: AnalysisResult): string | null {
  const h = result.headline
  if (!h) return null
  const of = h.label === 'mean' ? 'the overall mean' : h.label
  return `For ${of}, the design effect was ${formatNumber(h.designEffect)} and the effective n ${formatNumber(h.effectiveN)}.`
}

export function methodsParagraph({ result, settings, software }: ReportContext): string {
  const family = glmmFamily(result)
  if (family)
    return glmmMethodsParagraph(
      { result, family, trials: settings.trials },
      settings.bootstrap.enabled,
      software,
    )
  const sentences = present([modelSentence(result), formulaSentence(result), dfSentence(result)])
  sentences.push(...present([unitsCheckSentence(result, 'means')]))
  const boot = result.comparisons.bootstrap
  if (boot && settings.bootstrap.enabled) {
    sentences.push(
      `A hierarchical bootstrap (resampling units at every level, ${boot.resamples} resamples, seed “${boot.seed}”) gave percentile ${Math.round(boot.confidence * 100)}% intervals.`,
    )
  }
  const perCondition = unitsPerCondition(result)
  const outer = result.levels[0]
  sentences.push(
    perCondition
      ? `The independent unit is the “${result.conditionLevel}”: ${perCondition}, with ${result.nObs} observations in all${tableDesignEffect(result)}.`
      : `The ${result.nObs} observations came from ${outer.nUnits} units of “${outer.name}”${tableDesignEffect(result)}.`,
  )
  sentences.push(...present([headlineSentence(result)]))
  sentences.push(`Analyses were run in ${software} (statistics engine ${result.engine.version}).`)
  return sentences.join(' ')
}

function contrastSentence(c: MixedModelContrast, result: AnalysisResult, adjusted: boolean): string {
  const [low, high] = c.ci ?? contrastInterval(c.estimate, c.se, c.df)
  const p = adjusted ? `${formatP(c.pHolm)}, Holm-adjusted` : formatP(c.p)
  const a = result.groups.find((g) => g.condition === c.a)
  const b = result.groups.find((g) => g.condition === c.b)
  const n =
    a?.nUnits != null && b?.nUnits != null && result.conditionLevel
      ? `; n = ${a.nUnits} vs ${b.nUnits} units of “${result.conditionLevel}”`
      : ''
  return `${c.a} minus ${c.b}: ${formatNumber(c.estimate)} (95% CI ${formatInterval(low, high)}; t(${formatDf(c.df)}) = ${formatNumber(c.t)}, ${p}${n})`
}

function comparisonSentence(result: AnalysisResult): string {
  const model = result.comparisons.mixedModel
  const contrasts = (model?.contrasts ?? []).filter((c): c is MixedModelContrast => !isWald(c))
  const tail = 'linear mixed model, Satterthwaite df'
  const terms = termsResultSentence(result)
  if (terms) return terms
  if (!model || contrasts.length === 0) {
    const g = result.groups[0]
    return `The mean of “${result.response}” was ${formatNumber(g.clustered.estimate)} (95% CI ${formatInterval(g.clustered.ciLow, g.clustered.ciHigh)}; SE ${formatNumber(g.clustered.se)}, df ${formatDf(g.clustered.df)}; ${result.levels[0].nUnits} units of “${result.levels[0].name}”, ${result.nObs} observations; ${tail}).`
  }
  if (model.omnibus) {
    const f = model.omnibus
    const pairs = contrasts.map((c) => contrastSentence(c, result, true))
    return `Across conditions of “${result.condition}”, F(${formatDf(f.df1)}, ${formatDf(f.df2)}) = ${formatNumber(f.f)}, ${formatP(f.p)} (${tail}). Pairwise: ${pairs.join('; ')}.`
  }
  return `Difference in “${result.response}”, ${contrastSentence(contrasts[0], result, false)}; ${tail}.`
}

export function resultsSentence({ result, settings }: ReportContext): string {
  const family = glmmFamily(result)
  if (family) return glmmResultsSentence({ result, family, trials: settings.trials })
  return [
    comparisonSentence(result),
    ...present([simpleEffectsSentence(result), slopesSentence(result)]),
    ...effectVariationSentences(result),
  ].join(' ')
}

export function reportText(context: ReportContext): ReportText {
  return { methods: methodsParagraph(context), results: resultsSentence(context) }
}
