import { EngineInputError } from './engine-input-error'
import { fQuantile } from './f-quantile'
import { checkLabSummaries, type LabSummary } from './lab-summaries'
import { precisionFlag, type PrecisionFlag } from './precision-flag'

export interface MandelKResult {
  /** One value per laboratory, in input order. */
  k: number[]
  flags: PrecisionFlag[]
  /** Upper critical values of k. */
  critical: { fivePercent: number; onePercent: number }
  /** Results per laboratory used for the critical values (the rounded mean when they differ). */
  nUsed: number
  /** False when laboratories reported different numbers of results (critical values then approximate). */
  balanced: boolean
}

/**
 * Mandel's k: each laboratory's within-laboratory SD relative to the pooled SD of all
 * laboratories (within-laboratory consistency, ISO 5725-2:1994 §7.3.1).
 *
 * Formulas: k_i = s_i √p / √(Σ s_j²).
 *   Critical value: k_crit = √(p / (1 + (p − 1)/F)), F = F_{1−α}(n − 1, (p − 1)(n − 1))
 *   (Wilrich 2013, AStA Adv Stat Anal 97:1, exact for equal n). It matches ISO 5725-2 Table 6
 *   to the printed digit for most entries; a few printed entries differ by up to 0.01.
 *   With unequal n the rounded mean n is used and `balanced` is false (an approximation).
 *
 * Guard errors: fewer than two laboratories, malformed summaries, fewer than two results per
 * laboratory on average, all SDs zero.
 *
 * @example
 * mandelK([{ n: 2, mean: 10, sd: 0.1 }, { n: 2, mean: 10, sd: 0.2 }, { n: 2, mean: 10, sd: 0.9 }])
 * // → { k: [0.187, 0.374, 1.681], critical: { fivePercent: 1.645, onePercent: 1.715 },
 * //     flags: ['ok', 'ok', 'straggler'], nUsed: 2, balanced: true }
 */
export function mandelK(labs: LabSummary[]): MandelKResult {
  checkLabSummaries(labs, 2, 'mandelK')
  const p = labs.length
  const nUsed = Math.round(labs.reduce((sum, lab) => sum + lab.n, 0) / p)
  if (nUsed < 2) throw new EngineInputError('mandelK requires at least two results per laboratory')
  const sumSquares = labs.reduce((sum, lab) => sum + lab.sd * lab.sd, 0)
  if (sumSquares === 0) throw new EngineInputError('mandelK: every laboratory SD is 0, so k is undefined')
  const k = labs.map((lab) => (lab.sd * Math.sqrt(p)) / Math.sqrt(sumSquares))
  const critical = { fivePercent: kCritical(p, nUsed, 0.05), onePercent: kCritical(p, nUsed, 0.01) }
  return {
    k,
    flags: k.map((v) => precisionFlag(v, critical.fivePercent, critical.onePercent)),
    critical,
    nUsed,
    balanced: labs.every((lab) => lab.n === labs[0].n),
  }
}

function kCritical(p: number, n: number, alpha: number): number {
  const f = fQuantile(1 - alpha, n - 1, (p - 1) * (n - 1))
  return Math.sqrt(p / (1 + (p - 1) / f))
}
