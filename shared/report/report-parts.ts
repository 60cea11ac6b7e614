import {
  isWald,
  isWaldTerm,
  type AnalysisResult,
  type Coefficient,
  type TermTest,
} from '../schemas/analysis-result'
import { contrastInterval } from './contrast-interval'
import { effectVariationSentence } from './effect-variation'
import { formatDf, formatInterval, formatNumber, formatP } from './number-format'
import { responseUnit } from './response-unit'
import { componentLabel, listWords, pluralOf, termLabel } from './words'

/**
 * Sentences of "How to report this" for what engine ≥ 0.2 adds (two factors, covariates, the
 * formula, type III tests, level × condition variances). Each returns null or [] when its field
 * is absent, so a one-factor result of engine 0.1 reads exactly as before.
 */

const q = (name: string) => `“${name}”`

/** "“genotype” (WT and KO; reference WT) and “treatment” (vehicle and KX-9; reference vehicle)". */
export function factorsDescription(result: AnalysisResult): string | null {
  const factors = result.factors ?? []
  if (factors.length < 2) return null
  return listWords(factors.map((f) => `${q(f.name)} (${listWords(f.labels)}; reference ${f.reference})`))
}

/** ", adjusted for “soma_area”" or "". */
export function adjustedFor(result: AnalysisResult): string {
  const covariates = result.covariates ?? []
  return covariates.length ? `, adjusted for ${listWords(covariates.map((c) => q(c.name)))}` : ''
}

/**
 * The random part when it holds level × condition terms: "random intercepts for “lab” (3 units),
 * “lab × treatment” (6 groups) and “mouse” (24 units), so that the effect of treatment may differ
 * between labs (the maximal nested model)". Null when there are none (the older wording then
 * applies unchanged).
 */
export function randomDescription(result: AnalysisResult): string | null {
  const random = result.model?.random ?? []
  const crossed = random.filter((r) => r.factor !== null)
  if (crossed.length === 0) return null
  const items = random.map(
    (r) => `${q(componentLabel(r.name, random))} (${r.nGroups} ${r.factor === null ? 'units' : 'groups'})`,
  )
  const levels = [...new Set(crossed.map((r) => r.level))]
  const effects = levels.map((level) => {
    const factors = crossed.filter((r) => r.level === level).map((r) => termLabel(r.factor!))
    return `the effect${factors.length > 1 ? 's' : ''} of ${listWords(factors)} may differ between ${pluralOf(level)}`
  })
  return `random intercepts for ${listWords(items)}, so that ${listWords(effects)} (the maximal nested model)`
}

/** The random part: "random intercepts for “lab” (3 units) and “mouse” (12 units), each nested in the one before", or `randomDescription`'s when it has level × condition terms. */
export function levelsDescription(result: AnalysisResult): string {
  const crossed = randomDescription(result)
  if (crossed) return crossed
  const levels = result.levels.map((l) => `${q(l.name)} (${l.nUnits} units)`)
  return levels.length === 1
    ? `a random intercept for ${levels[0]}`
    : `random intercepts for ${listWords(levels)}, each nested in the one before`
}

export function formulaSentence(result: AnalysisResult): string | null {
  return result.model ? `In lme4 notation the model was ${result.model.formula}.` : null
}

/** How the fixed terms were tested, when the result has type III tests of two factors or covariates. */
export function termsMethodSentence(result: AnalysisResult): string | null {
  const terms = result.comparisons.mixedModel?.terms ?? []
  const twoFactors = (result.factors ?? []).length === 2
  if (!terms.length || (!twoFactors && !(result.covariates ?? []).length)) return null
  const parts = ['Each fixed term was tested with a type III F test with Satterthwaite degrees of freedom']
  const pairs = result.comparisons.mixedModel?.contrasts.length ?? 0
  if (twoFactors && pairs) parts.push('pairwise differences between design cells were Holm-adjusted')
  else if (pairs > 1) parts.push('pairwise differences were Holm-adjusted')
  if (result.comparisons.mixedModel?.simpleEffects?.length)
    parts.push('the effect of each factor was also estimated within each level of the other')
  return `${listWords(parts)}.`
}

function termTest(t: TermTest): string {
  return `${termLabel(t.term)} F(${formatDf(t.df1)}, ${formatDf(t.df2)}) = ${formatNumber(t.f)}, ${formatP(t.p)}`
}

/** "Type III tests (…): genotype F(1, 2.0) = 9.90, p = 0.086; …" for two factors. */
export function termsResultSentence(result: AnalysisResult): string | null {
  // F tests of a normal response; a binary or count model's χ² tests have words of their own.
  const terms = (result.comparisons.mixedModel?.terms ?? []).filter((t): t is TermTest => !isWaldTerm(t))
  const factorNames = new Set((result.factors ?? []).map((f) => f.name))
  const factorTerms = terms.filter((t) => t.term.split(':').every((name) => factorNames.has(name)))
  if ((result.factors ?? []).length < 2 || !factorTerms.length) return null
  return `Type III tests (linear mixed model, Satterthwaite df): ${factorTerms.map(termTest).join('; ')}.`
}

export function simpleEffectsSentence(result: AnalysisResult): string | null {
  const effects = result.comparisons.mixedModel?.simpleEffects ?? []
  const parts = effects.flatMap((e) =>
    e.contrasts.map(
      (c) =>
        `${e.factor} within ${e.at.factor} = ${e.at.level}, ${c.a} minus ${c.b}: ${formatNumber(c.estimate)} (95% CI ${formatInterval(c.ci[0], c.ci[1])}; t(${formatDf(c.df)}) = ${formatNumber(c.t)}, ${formatP(c.p)})`,
    ),
  )
  return parts.length ? `Simple effects: ${parts.join('; ')}.` : null
}

function slope(c: Coefficient): string {
  const [low, high] = contrastInterval(c.estimate, c.se, c.df)
  const unit = responseUnit(c.term)
  return `the slope for ${q(c.term)} was ${formatNumber(c.estimate)} per ${unit ? `1 ${unit}` : 'unit'} (95% CI ${formatInterval(low, high)}; t(${formatDf(c.df)}) = ${formatNumber(c.t)}, ${formatP(c.p)})`
}

export function slopesSentence(result: AnalysisResult): string | null {
  const names = new Set((result.covariates ?? []).map((c) => c.name))
  const slopes = (result.comparisons.mixedModel?.coefficients ?? []).filter(
    (c): c is Coefficient => !isWald(c) && c.level === null && names.has(c.term),
  )
  if (!slopes.length) return null
  const text = listWords(slopes.map(slope))
  return `Adjusting for the covariate${slopes.length > 1 ? 's' : ''}, ${text}.`
}

export function effectVariationSentences(result: AnalysisResult): string[] {
  const unit = responseUnit(result.response)
  return (result.effectVariation ?? []).map((v) =>
    effectVariationSentence(
      v,
      unit,
      `from the ${q(componentLabel(v.term, result.model?.random))} variance, ${v.nUnits} ${pluralOf(v.level)}`,
    ),
  )
}

/** The check on unit summaries: "As a check, a Student's t-test was run on the means of the 12 units of “mouse”." */
export function unitsCheckSentence(result: AnalysisResult, summaries: string): string | null {
  const unitsTest = result.comparisons.unitMeans
  if (!unitsTest) return null
  const test = {
    'student-t': "Student's t-test",
    'one-way-anova': 'one-way ANOVA',
    'two-way-anova': 'two-way ANOVA (type III)',
  }[unitsTest.method]
  return `As a check, a ${test} was run on the ${summaries} of the ${unitsTest.nUnits} units of “${unitsTest.level}”.`
}
