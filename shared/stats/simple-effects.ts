import { cellMeanRow } from './cell-mean-row'
import { satterthwaiteContrast } from './satterthwaite-contrast'
import { satterthwaiteF } from './satterthwaite-f'
import { studentTQuantile } from './student-t-quantile'
import type { Interval, NestedDesign, NestedFit } from './types'

export interface SimpleEffectResult {
  /** The factor whose effect is tested. */
  factor: string
  /** …within this level of the other factor. */
  at: { factor: string; level: string }
  /** F test of "all labels of `factor` equal" at that level (Satterthwaite). */
  test: { f: number; df1: number; df2: number; p: number }
  /** Each non-reference label against the reference, at that level: a − b. */
  contrasts: (Interval & { a: string; b: string; t: number; p: number })[]
}

/**
 * The simple effects of a two-factor model: the effect of each factor within each level of the
 * other (e.g. treatment in the wild type, treatment in the knock-out), from the mixed model —
 * each label against the reference as a Satterthwaite t test with a 95 % interval, and all
 * labels together as a Satterthwaite F test (F = t² for two labels).
 *
 *   contrast(a vs ref at b) = (x_{a,b} − x_{ref,b})ᵀ β̂
 *
 * Source: Kuznetsova, Brockhoff & Christensen (2017), J Stat Softw 82(13); Kirk (2013),
 * Experimental Design, 4th ed., §9.6 (simple main effects).
 *
 * Guard errors: none; fewer than two factors give an empty list.
 *
 * @example
 * simpleEffects(design, fit)[0]
 * // → { factor: 'treatment', at: { factor: 'genotype', level: 'WT' }, test: { f: 5.1, df1: 1, df2: 9.8, p: 0.048 }, contrasts: [ … ] }
 */
export function simpleEffects(design: NestedDesign, fit: NestedFit, confidence = 0.95): SimpleEffectResult[] {
  if (design.factors.length !== 2) return []
  const kB = design.factors[1].labels.length
  const cellOf = (codes: number[]) => codes[0] * kB + codes[1]
  const results: SimpleEffectResult[] = []
  for (const [f, g] of [
    [0, 1],
    [1, 0],
  ]) {
    const factor = design.factors[f]
    const other = design.factors[g]
    other.labels.forEach((level, j) => {
      const at = (i: number) => cellMeanRow(design, cellOf(f === 0 ? [i, j] : [j, i]))
      const rows = factor.labels.slice(1).map((_, i) => at(i + 1).map((v, k) => v - at(0)[k]))
      const contrasts = rows.map((row, i) => {
        const t = satterthwaiteContrast(design, fit, row)
        const half = studentTQuantile(1 - (1 - confidence) / 2, t.df) * t.se
        return {
          a: factor.labels[i + 1],
          b: factor.labels[0],
          estimate: t.estimate,
          se: t.se,
          df: t.df,
          ci: [t.estimate - half, t.estimate + half] as [number, number],
          t: t.t,
          p: t.p,
        }
      })
      results.push({
        factor: factor.name,
        at: { factor: other.name, level },
        test: satterthwaiteF(design, fit, rows),
        contrasts,
      })
    })
  }
  return results
}
