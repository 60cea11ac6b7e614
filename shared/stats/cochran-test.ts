import { EngineInputError } from './engine-input-error'
import { fQuantile } from './f-quantile'
import { checkLabSummaries, type LabSummary } from './lab-summaries'
import { precisionFlag, type PrecisionFlag } from './precision-flag'

export interface CochranTestResult {
  /** C = s²_max / Σ s_i². */
  c: number
  /** Index (input order) of the laboratory with the largest SD. */
  index: number
  /** Upper critical values of C. */
  critical: { fivePercent: number; onePercent: number }
  flag: PrecisionFlag
  /** Results per laboratory used for the critical values (the rounded mean when they differ). */
  nUsed: number
  /** False when laboratories reported different numbers of results (critical values then approximate). */
  balanced: boolean
}

/**
 * Cochran's test: is the largest within-laboratory variance too large compared with the others?
 * (ISO 5725-2:1994 §7.3.3; Cochran 1941, Ann Eugen 11:47.) Straggler above the 5% critical
 * value, outlier above the 1% value.
 *
 * Formulas: C = s²_max / Σ s_i²; critical value
 *   C_crit = 1 / (1 + (p − 1) / F), F = F_{1−α/p}(n − 1, (p − 1)(n − 1)).
 * This is exact whenever C_crit > 1/2 (then at most one laboratory can exceed it, so the
 * Bonferroni bound is an equality) and a slightly conservative approximation below that (many
 * laboratories, many results each); it reproduces Cochran's tables to the third decimal in the
 * checked cases. With unequal n the rounded mean n is used and `balanced` is false.
 *
 * Guard errors: fewer than two laboratories, malformed summaries, fewer than two results per
 * laboratory on average, all SDs zero.
 *
 * @example
 * cochranTest([{ n: 2, mean: 10, sd: 0.1 }, { n: 2, mean: 10, sd: 0.2 }, { n: 2, mean: 10, sd: 0.9 }, { n: 2, mean: 10, sd: 0.15 }])
 * // → { c: 0.9178, index: 2, critical: { fivePercent: 0.9065, onePercent: 0.9676 }, flag: 'straggler', … }
 */
export function cochranTest(labs: LabSummary[]): CochranTestResult {
  checkLabSummaries(labs, 2, 'cochranTest')
  const p = labs.length
  const nUsed = Math.round(labs.reduce((sum, lab) => sum + lab.n, 0) / p)
  if (nUsed < 2) throw new EngineInputError('cochranTest requires at least two results per laboratory')
  let index = 0
  let sumSquares = 0
  labs.forEach((lab, i) => {
    sumSquares += lab.sd * lab.sd
    if (lab.sd > labs[index].sd) index = i
  })
  if (sumSquares === 0) throw new EngineInputError('cochranTest: every laboratory SD is 0, so C is undefined')
  const c = (labs[index].sd * labs[index].sd) / sumSquares
  const critical = {
    fivePercent: cochranCritical(p, nUsed, 0.05),
    onePercent: cochranCritical(p, nUsed, 0.01),
  }
  return {
    c,
    index,
    critical,
    flag: precisionFlag(c, critical.fivePercent, critical.onePercent),
    nUsed,
    balanced: labs.every((lab) => lab.n === labs[0].n),
  }
}

function cochranCritical(p: number, n: number, alpha: number): number {
  const f = fQuantile(1 - alpha / p, n - 1, (p - 1) * (n - 1))
  return 1 / (1 + (p - 1) / f)
}
