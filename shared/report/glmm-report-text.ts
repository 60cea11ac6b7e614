import {
  isWald,
  isWaldTerm,
  type AnalysisResult,
  type WaldCoefficient,
  type WaldContrast,
  type WaldTermTest,
} from '../schemas/analysis-result'
import { normalQuantile } from '../stats/normal-quantile'
import { effectVariationSentence } from './effect-variation'
import { glmmModelName, linkScaleName, measureName, ratioName, type GlmmFamily } from './family-words'
import { formatDf, formatInterval, formatNumber, formatP } from './number-format'
import { adjustedFor, factorsDescription, levelsDescription, unitsCheckSentence } from './report-parts'
import { componentLabel, listWords, pluralOf, termLabel } from './words'

/**
 * "How to report this" for a binary or count response (a GLMM fitted by the Laplace
 * approximation): odds or rate ratios with Wald intervals and z tests, Wald χ² tests of terms,
 * proportions or rates for a typical unit, variance on the latent scale. The counting of
 * independent units and the closing sentences are those of the normal response.
 */

export interface GlmmReportFacts {
  result: AnalysisResult
  family: GlmmFamily
  /** Successes out of trials: the trials column (the response then holds the successes). */
  trials?: string | null
}

const q = (name: string) => `“${name}”`

/** What was measured, in words: "“marker” (yes = “positive”)", "successes “pos” out of “n”", "the counts in “puncta”". */
export function responseWords({ result, family, trials }: GlmmReportFacts): string {
  if (family === 'poisson') return `the counts in ${q(result.response)}`
  if (trials) return `the successes in ${q(result.response)} out of the trials in ${q(trials)}`
  if (result.outcome) return `${q(result.response)} (yes = ${q(result.outcome.positive)})`
  return `${q(result.response)} (1 = yes)`
}

function modelSentence(facts: GlmmReportFacts): string {
  const { result, family } = facts
  const subject = responseWords(facts)
  const model = `${glmmModelName(family)} fitted by maximum likelihood (Laplace approximation)${adjustedFor(result)}, with ${levelsDescription(result)}`
  const factors = factorsDescription(result)
  if (factors)
    return `${capitalised(subject)} ${verb(subject)} compared between the design cells of ${factors}, crossed with their interaction, with ${model}.`
  if (result.condition) {
    const conditions = result.groups.map((g) => g.condition)
    return `${capitalised(subject)} ${verb(subject)} compared between the conditions of ${q(result.condition)} (${listWords(conditions)}; reference ${result.reference}) with ${model}.`
  }
  return `The ${measureName(family)} of ${subject} was estimated with ${model}.`
}

function shortModelName(family: GlmmFamily): string {
  return family === 'binomial' ? 'logistic mixed model' : 'Poisson mixed model'
}

function verb(subject: string): string {
  return subject.startsWith('the counts') || subject.startsWith('the successes') ? 'were' : 'was'
}

function capitalised(text: string): string {
  return text.charAt(0).toUpperCase() + text.slice(1)
}

function formulaSentence(result: AnalysisResult): string | null {
  if (!result.model) return null
  const family = result.model.family ? `, family ${result.model.family}` : ''
  return `In lme4 notation the model was ${result.model.formula}${family}.`
}

function testsSentence({ result, family }: GlmmReportFacts): string | null {
  const model = result.comparisons.mixedModel
  if (!model) return null
  const parts = [
    `Differences were estimated as ${ratioName(family)}s with 95% Wald intervals and tested with Wald z tests`,
  ]
  if (model.contrasts.length > 1) parts.push('pairwise differences were Holm-adjusted')
  const severalTerms =
    result.groups.length > 2 || (result.factors ?? []).length === 2 || (result.covariates ?? []).length > 0
  if ((model.terms ?? []).length && severalTerms) parts.push('each fixed term was tested with a Wald χ² test')
  return `${listWords(parts)}.`
}

function latentSentence(family: GlmmFamily): string {
  const residual = family === 'binomial' ? 'π²/3' : 'ln(1 + 1/λ), λ the mean count'
  return `Variance shares and intraclass correlations are given on the latent (${linkScaleName(family)}) scale, with a residual variance of ${residual} (Nakagawa, Johnson & Schielzeth 2017).`
}

function unitsSentence(result: AnalysisResult): string {
  const outer = result.levels[0]
  if (!result.conditionLevel)
    return `The ${result.nObs} observations came from ${outer.nUnits} units of ${q(outer.name)}.`
  const parts = result.groups.map((g) => `${g.nUnits ?? '?'} (${g.condition})`)
  return `The independent unit is the ${q(result.conditionLevel)}: n = ${parts.join(', ')} units of ${q(result.conditionLevel)}, with ${result.nObs} observations in all.`
}

function headlineSentence(result: AnalysisResult): string | null {
  const h = result.headline
  if (!h) return null
  const of =
    h.label === 'mean' ? `the overall ${result.family === 'poisson' ? 'rate' : 'proportion'}` : h.label
  return `For ${of}, the design effect was ${formatNumber(h.designEffect)} and the effective n ${formatNumber(h.effectiveN)}.`
}

export function glmmMethodsParagraph(
  facts: GlmmReportFacts,
  bootstrapShown: boolean,
  software: string,
): string {
  const { result, family } = facts
  const sentences = [
    modelSentence(facts),
    formulaSentence(result),
    testsSentence(facts),
    latentSentence(family),
  ]
  sentences.push(unitsCheckSentence(facts.result, `${measureName(facts.family)}s`))
  const boot = result.comparisons.bootstrap
  if (boot && bootstrapShown)
    sentences.push(
      `A hierarchical bootstrap (resampling units at every level, ${boot.resamples} resamples, seed “${boot.seed}”) gave percentile ${Math.round(boot.confidence * 100)}% intervals of the differences in ${measureName(family)}s.`,
    )
  sentences.push(unitsSentence(result), headlineSentence(result))
  sentences.push(`Analyses were run in ${software} (statistics engine ${result.engine.version}).`)
  return sentences.filter((s): s is string => s !== null).join(' ')
}

/** The model's proportion or rate of one group for a typical unit, with its interval: "vehicle 0.391 [0.266, 0.532]". */
function typicalUnit(result: AnalysisResult, condition: string): string | null {
  const g = result.groups.find((group) => group.condition === condition)
  if (!g) return null
  return `${condition} ${formatNumber(g.clustered.estimate)} ${formatInterval(g.clustered.ciLow, g.clustered.ciHigh)}`
}

function unitCounts(result: AnalysisResult, c: WaldContrast): string {
  const a = result.groups.find((g) => g.condition === c.a)
  const b = result.groups.find((g) => g.condition === c.b)
  return a?.nUnits != null && b?.nUnits != null && result.conditionLevel
    ? `; n = ${a.nUnits} vs ${b.nUnits} units of ${q(result.conditionLevel)}`
    : ''
}

function ratioSentence(c: WaldContrast, result: AnalysisResult, family: GlmmFamily, holm: boolean): string {
  const p = holm ? `${formatP(c.pHolm)}, Holm-adjusted` : formatP(c.p)
  return `${c.a} versus ${c.b}: ${ratioName(family)} ${formatNumber(c.ratio)} (95% CI ${formatInterval(c.ratioLow, c.ratioHigh)}; z = ${formatNumber(c.z)}, ${p}${unitCounts(result, c)})`
}

function termTest(t: WaldTermTest): string {
  return `${termLabel(t.term)} χ²(${formatDf(t.df)}) = ${formatNumber(t.chisq)}, ${formatP(t.p)}`
}

function typicalUnitSentence(result: AnalysisResult, family: GlmmFamily): string {
  const unit = result.conditionLevel ?? result.levels[result.levels.length - 1].name
  const parts = result.groups.map((g) => typicalUnit(result, g.condition)).filter((s): s is string => !!s)
  return `The model’s ${measureName(family)}s for a typical ${unit} (random effects at 0), with 95% CIs: ${parts.join('; ')}.`
}

function comparisonSentence(facts: GlmmReportFacts): string {
  const { result, family } = facts
  const model = result.comparisons.mixedModel
  const contrasts = (model?.contrasts ?? []).filter((c): c is WaldContrast => isWald(c))
  const terms = (model?.terms ?? []).filter((t): t is WaldTermTest => isWaldTerm(t))
  const short = shortModelName(family)
  const tail = `${short}, Wald tests`
  if (!model || contrasts.length === 0) {
    const g = result.groups[0]
    const outer = result.levels[0]
    return `The ${measureName(family)} of ${responseWords(facts)} for a typical unit (random effects at 0) was ${formatNumber(g.clustered.estimate)} (95% CI ${formatInterval(g.clustered.ciLow, g.clustered.ciHigh)}; the plain ${measureName(family)} was ${formatNumber(g.mean)}; ${outer.nUnits} units of ${q(outer.name)}, ${result.nObs} observations; ${short}).`
  }
  const factors = result.factors ?? []
  if (factors.length === 2) {
    const names = new Set(factors.map((f) => f.name))
    const factorTerms = terms.filter((t) => t.term.split(':').every((name) => names.has(name)))
    return `Wald χ² tests (${short}, type III hypotheses): ${factorTerms.map(termTest).join('; ')}.`
  }
  if (contrasts.length > 1) {
    const factorTerm = terms.find((t) => t.term === result.condition)
    const overall = factorTerm
      ? `Across conditions of ${q(result.condition ?? '')}, Wald χ²(${formatDf(factorTerm.df)}) = ${formatNumber(factorTerm.chisq)}, ${formatP(factorTerm.p)} (${tail}). `
      : ''
    const pairs = contrasts.map((c) => ratioSentence(c, result, family, true))
    return `${overall}Pairwise: ${pairs.join('; ')}.`
  }
  return `For ${responseWords(facts)}, ${ratioSentence(contrasts[0], result, family, false)}; ${tail}.`
}

function slope(c: WaldCoefficient, family: GlmmFamily): string {
  const half = normalQuantile(0.975) * c.se
  return `the ${ratioName(family)} per unit of ${q(c.term)} was ${formatNumber(Math.exp(c.estimate))} (95% CI ${formatInterval(Math.exp(c.estimate - half), Math.exp(c.estimate + half))}; z = ${formatNumber(c.z)}, ${formatP(c.p)})`
}

function slopesSentence({ result, family }: GlmmReportFacts): string | null {
  const names = new Set((result.covariates ?? []).map((c) => c.name))
  const slopes = (result.comparisons.mixedModel?.coefficients ?? []).filter(
    (c): c is WaldCoefficient => isWald(c) && c.level === null && names.has(c.term),
  )
  if (!slopes.length) return null
  return `Adjusting for the covariate${slopes.length > 1 ? 's' : ''}, ${listWords(slopes.map((c) => slope(c, family)))}.`
}

function effectVariationSentences({ result, family }: GlmmReportFacts): string[] {
  return (result.effectVariation ?? []).map((v) =>
    effectVariationSentence(
      v,
      `on the ${linkScaleName(family)} scale`,
      `from the ${q(componentLabel(v.term, result.model?.random))} variance, ${v.nUnits} ${pluralOf(v.level)}`,
    ),
  )
}

export function glmmResultsSentence(facts: GlmmReportFacts): string {
  const { result, family } = facts
  const parts = [comparisonSentence(facts)]
  if (result.comparisons.mixedModel && result.groups.length > 1)
    parts.push(typicalUnitSentence(result, family))
  const slopes = slopesSentence(facts)
  if (slopes) parts.push(slopes)
  parts.push(...effectVariationSentences(facts))
  return parts.join(' ')
}
