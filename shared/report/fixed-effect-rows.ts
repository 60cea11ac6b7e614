import type { AnalysisResult, Coefficient, SimpleEffect, TermTest } from '../schemas/analysis-result'
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
  df: string
  t: string
  p: string
}

type Facts = Pick<AnalysisResult, 'factors' | 'covariates'>

function reading(c: Coefficient, { factors = [], covariates = [] }: Facts): string {
  if (c.term === '(intercept)') {
    // Treatment coding, covariates as given (not centred), as lme4 reports it.
    const at = [
      ...factors.map((f) => `${f.name} = ${f.reference}`),
      ...covariates.map((v) => `${v.name} = 0`),
    ]
    return at.length ? `mean at ${at.join(', ')}` : 'overall mean'
  }
  const factor = factors.find((f) => f.name === c.term)
  if (factor && c.level !== null) {
    const other = factors.find((f) => f !== factor)
    return `${c.level} − ${factor.reference}${other ? ` when ${other.name} = ${other.reference}` : ''}`
  }
  const covariate = covariates.find((v) => v.name === c.term)
  if (covariate || c.level === null) {
    const unit = responseUnit(c.term)
    return `slope: change per ${unit ? `1 ${unit}` : 'unit'} of ${c.term}`
  }
  return `extra difference for ${termLabel(c.level)} beyond the two effects alone`
}

export function coefficientRows(coefficients: readonly Coefficient[], facts: Facts): CoefficientRow[] {
  return coefficients.map((c) => ({
    id: `${c.term}|${c.level ?? ''}`,
    term: termLabel(c.term),
    level: c.level === null ? '—' : termLabel(c.level),
    reads: reading(c, facts),
    estimate: formatNumber(c.estimate),
    se: formatNumber(c.se),
    df: formatDf(c.df),
    t: formatNumber(c.t),
    p: formatP(c.p),
  }))
}

export interface TermRow {
  id: string
  term: string
  f: string
  df1: string
  df2: string
  p: string
}

/** "genotype × treatment (interaction)"; F with three significant digits, df with one decimal. */
export function termRows(terms: readonly TermTest[]): TermRow[] {
  return terms.map((t) => ({
    id: t.term,
    term: t.term.includes(':') ? `${termLabel(t.term)} (interaction)` : t.term,
    f: formatNumber(t.f),
    df1: formatDf(t.df1),
    df2: formatDf(t.df2),
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
