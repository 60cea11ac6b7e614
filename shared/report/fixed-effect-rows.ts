import {
  isWald,
  isWaldTerm,
  type AnalysisResult,
  type Coefficient,
  type SimpleEffect,
  type TermTest,
  type WaldCoefficient,
  type WaldTermTest,
} from '../schemas/analysis-result'
import { normalQuantile } from '../stats/normal-quantile'
import { glmmFamily, linkScaleName, ratioAbbreviation, ratioName, type GlmmFamily } from './family-words'
import { formatDf, formatInterval, formatNumber, formatP } from './number-format'
import { responseUnit } from './response-unit'
import { termLabel } from './words'

/** Rows of the tables of fixed effects: coefficients, type III term tests and simple effects. */

export interface CoefficientRow {
  id: string
  term: string
  level: string
  /** What the number means, in words: "KO − WT", "slope per unit of soma_area_um2". */
  reads: string
  estimate: string
  se: string
  /** Satterthwaite df of a normal response; "—" for a Wald z test (binary and count responses). */
  df: string
  /** t (normal response) or z (Wald, binary and count responses): see `coefficientStatistic`. */
  statistic: string
  p: string
  /**
   * Binary and count responses: exp(estimate), the odds or rate ratio a coefficient stands for,
   * with its 95 % Wald interval ("OR 0.30 [0.096, 0.94]"); "—" for the intercept and for a
   * normal response.
   */
  ratio: string
}

type Facts = Pick<AnalysisResult, 'factors' | 'covariates'> & Partial<Pick<AnalysisResult, 'family'>>

function reading(c: Coefficient | WaldCoefficient, facts: Facts): string {
  const { factors = [], covariates = [] } = facts
  const family = glmmFamily(facts)
  if (c.term === '(intercept)') {
    // Treatment coding, covariates as given (not centred), as lme4 reports it.
    const at = [
      ...factors.map((f) => `${f.name} = ${f.reference}`),
      ...covariates.map((v) => `${v.name} = 0`),
    ]
    const what = family ? linkScaleName(family) : 'mean'
    return at.length ? `${what} at ${at.join(', ')}` : family ? `overall ${what}` : 'overall mean'
  }
  const factor = factors.find((f) => f.name === c.term)
  if (factor && c.level !== null) {
    const other = factors.find((f) => f !== factor)
    const when = other ? ` when ${other.name} = ${other.reference}` : ''
    if (family) return `log ${ratioName(family)} of ${c.level} against ${factor.reference}${when}`
    return `${c.level} − ${factor.reference}${when}`
  }
  const covariate = covariates.find((v) => v.name === c.term)
  if (covariate || c.level === null) {
    const unit = responseUnit(c.term)
    const change = family ? `change in ${linkScaleName(family)}` : 'change'
    return `slope: ${change} per ${unit ? `1 ${unit}` : 'unit'} of ${c.term}`
  }
  return `extra difference${family ? ` in ${linkScaleName(family)}` : ''} for ${termLabel(c.level)} beyond the two effects alone`
}

/** Wald interval of exp(coefficient): exp(estimate ± z₀.₉₇₅ · SE), as the contrasts' ratios. */
function ratioCell(c: WaldCoefficient, family: GlmmFamily): string {
  if (c.term === '(intercept)') return '—'
  const half = normalQuantile(0.975) * c.se
  return `${ratioAbbreviation(family)} ${formatNumber(Math.exp(c.estimate))} ${formatInterval(Math.exp(c.estimate - half), Math.exp(c.estimate + half))}`
}

/** "t" for a normal response's coefficients, "z" for a binary or count model's Wald tests. */
export function coefficientStatistic(coefficients: readonly (Coefficient | WaldCoefficient)[]): 't' | 'z' {
  return coefficients.some((c) => isWald(c)) ? 'z' : 't'
}

export function coefficientRows(
  coefficients: readonly (Coefficient | WaldCoefficient)[],
  facts: Facts,
): CoefficientRow[] {
  const family = glmmFamily(facts) ?? 'binomial'
  return coefficients.map((c) => ({
    id: `${c.term}|${c.level ?? ''}`,
    term: termLabel(c.term),
    level: c.level === null ? '—' : termLabel(c.level),
    reads: reading(c, facts),
    estimate: formatNumber(c.estimate),
    se: formatNumber(c.se),
    df: isWald(c) ? '—' : formatDf(c.df),
    statistic: formatNumber(isWald(c) ? c.z : c.t),
    p: formatP(c.p),
    ratio: isWald(c) ? ratioCell(c, family) : '—',
  }))
}

export interface TermRow {
  id: string
  term: string
  /** F (type III, Satterthwaite) or χ² (Wald, binary and count responses), and its value. */
  statistic: 'F' | 'χ²'
  value: string
  /** Numerator df of an F test, or the df of a χ² test. */
  df1: string
  /** Denominator df of an F test; "—" for a χ² test, which has none. */
  df2: string
  p: string
}

/** "F" for a normal response's term tests, "χ²" for a binary or count model's Wald tests. */
export function termStatistic(terms: readonly (TermTest | WaldTermTest)[]): 'F' | 'χ²' {
  return terms.some((t) => isWaldTerm(t)) ? 'χ²' : 'F'
}

/** "genotype × treatment (interaction)"; F or χ² with three significant digits, df with one decimal. */
export function termRows(terms: readonly (TermTest | WaldTermTest)[]): TermRow[] {
  return terms.map((t) => ({
    id: t.term,
    term: t.term.includes(':') ? `${termLabel(t.term)} (interaction)` : t.term,
    statistic: isWaldTerm(t) ? 'χ²' : 'F',
    value: formatNumber(isWaldTerm(t) ? t.chisq : t.f),
    df1: formatDf(isWaldTerm(t) ? t.df : t.df1),
    df2: isWaldTerm(t) ? '—' : formatDf(t.df2),
    p: formatP(t.p),
  }))
}

export interface SimpleEffectRow {
  id: string
  /** "treatment within genotype = WT" */
  effect: string
  compared: string
  estimate: string
  interval: string
  df: string
  t: string
  p: string
  /** The F test of the whole simple effect, when the factor has three or more levels. */
  test: string | null
}

export function simpleEffectRows(effects: readonly SimpleEffect[]): SimpleEffectRow[] {
  return effects.flatMap((e) =>
    e.contrasts.map((c, i) => ({
      id: `${e.factor}|${e.at.factor}=${e.at.level}|${c.a}|${c.b}`,
      effect: `${e.factor} within ${e.at.factor} = ${e.at.level}`,
      compared: `${c.a} − ${c.b}`,
      estimate: formatNumber(c.estimate),
      interval: formatInterval(c.ci[0], c.ci[1]),
      df: formatDf(c.df),
      t: formatNumber(c.t),
      p: formatP(c.p),
      test:
        i === 0 && e.contrasts.length > 1
          ? `F(${formatDf(e.test.df1)}, ${formatDf(e.test.df2)}) = ${formatNumber(e.test.f)}, ${formatP(e.test.p)}`
          : null,
    })),
  )
}
