import type { NaiveTest } from '../schemas/analysis-result'
import { chiSquareUpperP } from '../stats/chi-square-upper-p'
import type { NestedDesign } from '../stats/types'
import { waldChiSquare } from '../stats/wald-chi-square'

/**
 * The comparison of a binary or count response that ignores the nesting, kept to show how wrong
 * it is: for a yes/no response with one condition factor and no covariate, Pearson's χ² test of
 * the conditions × outcome table; otherwise the model's fixed terms in a GLM without units, each
 * term a Wald χ² test with the mixed model's hypotheses. Null without fixed terms.
 *
 * Source: Pearson (1900), Phil Mag 50:157; Agresti (2013), Categorical Data Analysis, 3rd ed.,
 * §3.2 (χ² test of independence) and §4.4 (Wald tests in GLMs).
 *
 * @example
 * glmmNaiveComparison(design, 'binomial', counts, glm, hypotheses) // → { method: 'chi-square', chisq: 18.2, df: 2, p: 1.1e-4 }
 */
export function glmmNaiveComparison(
  design: NestedDesign,
  family: 'binomial' | 'poisson',
  counts: { y: Float64Array; n: Float64Array },
  glm: { beta: number[]; vcov: number[][] },
  hypotheses: { term: string; rows: number[][] }[],
): NaiveTest | null {
  if (design.fixed.terms.length === 0) return null
  if (family === 'binomial' && design.factors.length === 1 && design.covariates.length === 0) {
    return { method: 'chi-square', ...pearsonIndependence(counts) }
  }
  return {
    method: 'glm',
    terms: hypotheses.map(({ term, rows }) => ({ term, ...waldChiSquare(glm.beta, glm.vcov, rows) })),
  }
}

/** χ² of a k × 2 table (successes, failures per condition) against independence. */
function pearsonIndependence(counts: { y: Float64Array; n: Float64Array }): {
  chisq: number
  df: number
  p: number
} {
  const k = counts.y.length
  let successes = 0
  let total = 0
  for (let c = 0; c < k; c++) {
    successes += counts.y[c]
    total += counts.n[c]
  }
  const rate = successes / total
  let chisq = 0
  for (let c = 0; c < k; c++) {
    const expectedYes = counts.n[c] * rate
    const expectedNo = counts.n[c] * (1 - rate)
    chisq +=
      (counts.y[c] - expectedYes) ** 2 / expectedYes +
      (counts.n[c] - counts.y[c] - expectedNo) ** 2 / expectedNo
  }
  return { chisq, df: k - 1, p: chiSquareUpperP(chisq, k - 1) }
}
