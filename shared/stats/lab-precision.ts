import { EngineInputError } from './engine-input-error'
import { checkLabSummaries, type LabSummary } from './lab-summaries'

export interface LabPrecisionResult {
  /** Number of laboratories p. */
  p: number
  /** General mean m̂ = Σ n_i ȳ_i / Σ n_i. */
  grandMean: number
  /** Repeatability standard deviation s_r. */
  sr: number
  /** Between-laboratory standard deviation s_L (0 when its estimate is negative; see `sLTruncated`). */
  sL: number
  /** Reproducibility standard deviation s_R = √(s_L² + s_r²). */
  sR: number
  /** Repeatability limit r = 2.8 s_r. */
  r: number
  /** Reproducibility limit R = 2.8 s_R. */
  R: number
  /** s_d² = Σ n_i (ȳ_i − m̂)² / (p − 1), the between-laboratory mean square. */
  sd2: number
  /** n̄ = (Σ n_i − Σ n_i² / Σ n_i) / (p − 1). */
  nBar: number
  /** True when (s_d² − s_r²)/n̄ was negative and s_L was set to 0. */
  sLTruncated: boolean
}

/**
 * Precision of a measurement method from an interlaboratory study at one level (ISO 5725-2:1994,
 * §7.4.4–7.4.5, formulas for unequal numbers of results per laboratory): the repeatability SD
 * (within a laboratory), the between-laboratory SD and the reproducibility SD (between
 * laboratories), with the repeatability and reproducibility limits.
 *
 * Formulas: s_r² = Σ (n_i − 1) s_i² / Σ (n_i − 1);  m̂ = Σ n_i ȳ_i / Σ n_i;
 *   s_d² = Σ n_i (ȳ_i − m̂)² / (p − 1);  n̄ = (Σ n_i − Σ n_i² / Σ n_i) / (p − 1);
 *   s_L² = (s_d² − s_r²) / n̄, set to 0 when negative;  s_R² = s_L² + s_r²;
 *   r = 2.8 s_r, R = 2.8 s_R (2.8 ≈ 1.96 √2). These are the one-way ANOVA estimates
 *   (MSW, (MSB − MSW)/n0) of oneWayAnova.
 *
 * Guard errors: fewer than two laboratories, malformed summaries (see checkLabSummaries), no
 * laboratory with two or more results.
 *
 * @example
 * labPrecision([{ n: 5, mean: 1505, sd: 63.05 }, { n: 5, mean: 1528, sd: 33.28 }, { n: 5, mean: 1564, sd: 37.98 },
 *   { n: 5, mean: 1498, sd: 68.70 }, { n: 5, mean: 1600, sd: 50.00 }, { n: 5, mean: 1470, sd: 31.02 }])
 * // → { p: 6, grandMean: 1527.5, sr: 49.51, sL: 42.00, sR: 64.93, r: 138.6, R: 181.8, … }   (Dyestuff batches)
 */
export function labPrecision(labs: LabSummary[]): LabPrecisionResult {
  checkLabSummaries(labs, 2, 'labPrecision')
  const p = labs.length
  let t1 = 0
  let t3 = 0
  let t4 = 0
  let t5 = 0
  for (const lab of labs) {
    t1 += lab.n * lab.mean
    t3 += lab.n
    t4 += lab.n * lab.n
    t5 += (lab.n - 1) * lab.sd * lab.sd
  }
  if (t3 - p < 1) {
    throw new EngineInputError('labPrecision requires at least one laboratory with two or more results')
  }
  const grandMean = t1 / t3
  let between = 0
  for (const lab of labs) between += lab.n * (lab.mean - grandMean) ** 2
  const sr2 = t5 / (t3 - p)
  const sd2 = between / (p - 1)
  const nBar = (t3 - t4 / t3) / (p - 1)
  const sL2Raw = (sd2 - sr2) / nBar
  const sLTruncated = sL2Raw < 0
  const sL2 = sLTruncated ? 0 : sL2Raw
  const sr = Math.sqrt(sr2)
  const sR = Math.sqrt(sL2 + sr2)
  return { p, grandMean, sr, sL: Math.sqrt(sL2), sR, r: 2.8 * sr, R: 2.8 * sR, sd2, nBar, sLTruncated }
}
