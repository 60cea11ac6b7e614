import { holmAdjust } from './holm-adjust'
import { satterthwaiteContrast } from './satterthwaite-contrast'
import type { NestedDesign, NestedFit } from './types'

export interface PairwiseContrast {
  /** The later condition (in the design's label order). */
  a: string
  /** The earlier condition; with the reference first, every comparison with it reads "x − reference". */
  b: string
  /** mean(a) − mean(b) from the mixed model. */
  estimate: number
  se: number
  /** Satterthwaite degrees of freedom. */
  df: number
  t: number
  p: number
  /** Holm-adjusted p over all pairs. */
  pHolm: number
}

/**
 * All pairwise differences between condition means from the mixed model, each a Satterthwaite
 * t test, with Holm-adjusted p-values across the pairs. Pairs run in label order (reference
 * first): for labels [r, x, z] the pairs are x − r, z − r, z − x.
 *
 *   estimate = β_a − β_b (β_ref = 0),  t = estimate / √(lᵀCl),  df by Satterthwaite
 *
 * Source: Kuznetsova, Brockhoff & Christensen (2017), J Stat Softw 82(13) (lmerTest contest);
 * Holm (1979), Scand J Statist 6:65.
 *
 * Guard errors: none; a design without condition has no pairs (empty list).
 *
 * @example
 * pairwiseContrasts(machinesDesign, machinesFit)[0]
 * // → { a: 'B', b: 'A', estimate: 7.967, se: 2.177, df: 10.0, t: 3.660, p: 0.00439, pHolm: 0.00878 }
 */
export function pairwiseContrasts(design: NestedDesign, fit: NestedFit): PairwiseContrast[] {
  const labels = design.condition?.labels ?? []
  const pairs: Omit<PairwiseContrast, 'pHolm'>[] = []
  for (let j = 1; j < labels.length; j++) {
    for (let i = 0; i < j; i++) {
      const L = fit.beta.map((_, k) => (k === j ? 1 : 0) - (k === i && i > 0 ? 1 : 0))
      pairs.push({ a: labels[j], b: labels[i], ...satterthwaiteContrast(design, fit, L) })
    }
  }
  pairs.sort((x, y) => labels.indexOf(x.b) - labels.indexOf(y.b) || labels.indexOf(x.a) - labels.indexOf(y.a))
  const adjusted = holmAdjust(pairs.map((c) => c.p))
  return pairs.map((c, i) => ({ ...c, pHolm: adjusted[i] }))
}
