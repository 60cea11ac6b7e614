import type { AnalysisResult } from '../schemas/analysis-result'

/**
 * Words for binary (binomial, logit link) and count (Poisson, log link) responses, shared by the
 * result page, the printable report and "How to report this" so all say the same thing. A result
 * without `family` (engines before 0.3) is a normal response.
 */

export type GlmmFamily = 'binomial' | 'poisson'

/** The family of a binary or count result; null for a normal response (and for every older result). */
export function glmmFamily(result: Pick<AnalysisResult, 'family'>): GlmmFamily | null {
  return result.family === 'binomial' || result.family === 'poisson' ? result.family : null
}

/** "odds ratio" / "rate ratio": exp of a difference on the link scale. */
export function ratioName(family: GlmmFamily): string {
  return family === 'binomial' ? 'odds ratio' : 'rate ratio'
}

/** "OR" / "RR", for tight table cells. */
export function ratioAbbreviation(family: GlmmFamily): string {
  return family === 'binomial' ? 'OR' : 'RR'
}

/** "log odds" / "log rate": the scale of the coefficients and of the latent variance. */
export function linkScaleName(family: GlmmFamily): string {
  return family === 'binomial' ? 'log odds' : 'log rate'
}

/** "proportion" / "rate": what a group's or a unit's mean is. */
export function measureName(family: GlmmFamily): string {
  return family === 'binomial' ? 'proportion' : 'rate'
}

/** "a logistic mixed model" / "a Poisson mixed model (log link)". */
export function glmmModelName(family: GlmmFamily): string {
  return family === 'binomial'
    ? 'a logistic mixed model (binomial, logit link)'
    : 'a Poisson mixed model (log link)'
}

/**
 * Where the latent residual comes from, in one sentence (Nakagawa, Johnson & Schielzeth 2017,
 * J R Soc Interface 14:20170213): π²/3 for the logit link, ln(1 + 1/λ) for the log link.
 */
export function latentScaleNote(family: GlmmFamily): string {
  return family === 'binomial'
    ? 'These shares are on the latent (log-odds) scale: the variance within units is the logistic distribution’s π²/3 ≈ 3.29, after Nakagawa, Johnson & Schielzeth (2017). They are not shares of the 0/1 values themselves.'
    : 'These shares are on the latent (log) scale: the variance within units is ln(1 + 1/λ) at the mean count λ, after Nakagawa, Johnson & Schielzeth (2017). They are not shares of the counts themselves.'
}

/**
 * What a unit's point and a group's bar show, as the y axis of the main chart: "proportion
 * “positive” in “marker”", "proportion of successes (“positive_neurons” of “neurons_counted”)",
 * "“puncta” per observation (rate)". Null for a normal response (its column name says it).
 */
export function responseScaleName(
  result: Pick<AnalysisResult, 'family' | 'response' | 'outcome'>,
  trials?: string | null,
): string | null {
  const family = glmmFamily(result)
  if (!family) return null
  if (family === 'poisson') return `“${result.response}” per observation (rate)`
  if (trials) return `proportion “${result.response}” of “${trials}”`
  if (result.outcome) return `proportion “${result.outcome.positive}” in “${result.response}”`
  return `proportion of 1 in “${result.response}”`
}

/**
 * The caution every model deserves, shown under the warnings: what it assumes (for a binary or
 * count model, on its link scale), what few units mean, and which designs it does not cover
 * (common practice, no source).
 */
export function modelCaution(result: Pick<AnalysisResult, 'family'>): string {
  const family = glmmFamily(result)
  const assumption = family
    ? `the differences between units roughly normal on the ${linkScaleName(family)} scale` +
      (family === 'poisson' ? ', and the counts no more spread than the model allows' : '')
    : 'the spread within and between them roughly alike across conditions'
  return (
    `A model is only as good as its assumptions: the units must be independent of each other, and ${assumption}. ` +
    'With few independent units the comparison has little power, so “no difference found” is weak evidence. ' +
    'For designs this page does not cover (repeated measures over time, crossed random factors, more than two ' +
    'condition factors, responses that are neither measurements, yes/no nor counts) consult a statistician.'
  )
}
