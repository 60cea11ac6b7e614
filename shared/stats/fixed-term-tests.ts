import { fixedCrossProducts } from './reml/cross-products'
import { nestedSufficientStats } from './reml/sufficient-stats'
import { satterthwaiteF, type SatterthwaiteFResult } from './satterthwaite-f'
import { typeOneHypotheses } from './type-one-hypotheses'
import { typeThreeHypotheses } from './type-three-hypotheses'
import type { NestedDesign, NestedFit } from './types'

export interface FixedTermTest extends SatterthwaiteFResult {
  /** A factor's name, a covariate's name, or "A:B". */
  term: string
}

/**
 * One F test per fixed term (each factor, each covariate, the A × B interaction) with
 * Satterthwaite's denominator df, as lmerTest's anova(model, type = 3): type III hypotheses when
 * the model has two or more terms, and, as lmerTest does for a single term, the type I one (the
 * same F). For a one-df term F = t² of its coefficient.
 *
 * Source: Kuznetsova, Brockhoff & Christensen (2017), J Stat Softw 82(13), §3.3 and §5; Fai &
 * Cornelius (1996), J Stat Comput Simul 54:363.
 *
 * Guard errors: none; a model without fixed terms gives an empty list.
 *
 * @example
 * fixedTermTests(oatsDesign, oatsFit).map((t) => t.term) // → ['Variety', 'nitro', 'Variety:nitro']
 */
export function fixedTermTests(design: NestedDesign, fit: NestedFit): FixedTermTest[] {
  const terms = design.fixed.terms
  if (terms.length === 0) return []
  const hypotheses =
    terms.length === 1
      ? typeOneHypotheses(fixedCrossProducts(nestedSufficientStats(design)), terms)
      : typeThreeHypotheses(
          design.fixed,
          design.factors.map((f) => f.labels.length),
        )
  return hypotheses.map(({ term, rows }) => ({ term, ...satterthwaiteF(design, fit, rows) }))
}
