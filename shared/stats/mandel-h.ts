import { EngineInputError } from './engine-input-error'
import { checkLabSummaries, type LabSummary } from './lab-summaries'
import { precisionFlag, type PrecisionFlag } from './precision-flag'
import { studentTQuantile } from './student-t-quantile'

export interface MandelHResult {
  /** One value per laboratory, in input order. */
  h: number[]
  flags: PrecisionFlag[]
  /** Two-sided critical values of |h|. */
  critical: { fivePercent: number; onePercent: number }
}

/**
 * Mandel's h: how far each laboratory's mean lies from the others', in units of the spread of
 * the laboratory means (between-laboratory consistency, ISO 5725-2:1994 §7.3.1).
 *
 * Formulas: h_i = (ȳ_i − ȳ̄) / s_ȳ with ȳ̄ the plain mean of the p laboratory means and
 *   s_ȳ their SD (divisor p − 1).
 *   Critical value: h_crit = (p − 1) t / √(p (t² + p − 2)), t = t_{1−α/2, p−2}
 *   (Wilrich 2013, AStA Adv Stat Anal 97:1, exact formula; it reproduces ISO 5725-2 Table 6).
 * From memory: that ISO uses the plain (unweighted) mean of the cell means here; with equal n
 * the weighted and plain means coincide, and the critical values assume equal n anyway.
 *
 * Guard errors: fewer than three laboratories, malformed summaries, all means equal.
 *
 * @example
 * mandelH([{ n: 2, mean: 10, sd: 1 }, { n: 2, mean: 11, sd: 1 }, { n: 2, mean: 12, sd: 1 }, { n: 2, mean: 16, sd: 1 }])
 * // → { h: [-0.856, -0.475, -0.095, 1.426], critical: { fivePercent: 1.425, onePercent: 1.485 },
 * //     flags: ['ok', 'ok', 'ok', 'straggler'] }
 */
export function mandelH(labs: LabSummary[]): MandelHResult {
  checkLabSummaries(labs, 3, 'mandelH')
  const p = labs.length
  const means = labs.map((lab) => lab.mean)
  const center = means.reduce((a, b) => a + b, 0) / p
  const spread = Math.sqrt(means.reduce((sum, m) => sum + (m - center) ** 2, 0) / (p - 1))
  if (spread === 0) throw new EngineInputError('mandelH: all laboratory means are equal, so h is undefined')
  const h = means.map((m) => (m - center) / spread)
  const critical = { fivePercent: hCritical(p, 0.05), onePercent: hCritical(p, 0.01) }
  return {
    h,
    flags: h.map((v) => precisionFlag(Math.abs(v), critical.fivePercent, critical.onePercent)),
    critical,
  }
}

function hCritical(p: number, alpha: number): number {
  const t = studentTQuantile(1 - alpha / 2, p - 2)
  return ((p - 1) * t) / Math.sqrt(p * (t * t + p - 2))
}
