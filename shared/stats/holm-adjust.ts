import { EngineInputError } from './engine-input-error'

/**
 * Holm's step-down adjustment of p-values for multiple comparisons: it controls the family-wise
 * error rate like Bonferroni but rejects more. Sort the m p-values ascending, multiply the i-th
 * smallest by (m − i + 1), carry the running maximum forward, cap at 1; results come back in the
 * input order (as R's p.adjust(p, "holm")).
 *
 *   p̃_(i) = min(1, max_{j ≤ i} (m − j + 1) p_(j))
 *
 * Source: Holm (1979), Scand J Statist 6:65.
 *
 * Guard errors (EngineInputError): a p-value that is not a number in [0, 1].
 *
 * @example
 * holmAdjust([0.01, 0.04, 0.03]) // → [0.03, 0.06, 0.06]
 */
export function holmAdjust(p: number[]): number[] {
  for (const v of p) {
    if (!(v >= 0 && v <= 1)) throw new EngineInputError(`Holm adjustment needs p-values in [0, 1]; got ${v}.`)
  }
  const m = p.length
  const order = p.map((_, i) => i).sort((i, j) => p[i] - p[j])
  const adjusted = new Array<number>(m)
  let running = 0
  order.forEach((i, rank) => {
    running = Math.max(running, Math.min(1, (m - rank) * p[i]))
    adjusted[i] = running
  })
  return adjusted
}
