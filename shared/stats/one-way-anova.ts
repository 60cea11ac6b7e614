import { EngineInputError } from './engine-input-error'
import { fQuantile } from './f-quantile'
import { fUpperP } from './reml/f-upper-p'

export interface OneWayAnovaOptions {
  /** Confidence level of the ICC interval, default 0.95. */
  confidence?: number
}

export interface OneWayAnovaResult {
  /** Number of groups (clusters). */
  k: number
  /** Total number of observations. */
  n: number
  /** Mean square between groups. */
  msb: number
  /** Mean square within groups. */
  msw: number
  dfBetween: number
  dfWithin: number
  f: number
  /** Upper-tail p-value of F. */
  p: number
  /** Effective group size n0 = (N − Σ n_i² / N) / (k − 1); equals n for balanced groups. */
  n0: number
  /** σ_b² = (MSB − MSW) / n0, set to 0 when that is negative (see `varianceBetweenTruncated`). */
  varianceBetween: number
  /** The untruncated (MSB − MSW) / n0, which can be negative. */
  varianceBetweenRaw: number
  /** True when (MSB − MSW) / n0 was negative and reported as 0. */
  varianceBetweenTruncated: boolean
  /** σ_w² = MSW. */
  varianceWithin: number
  /** ICC(1) = σ_b² / (σ_b² + σ_w²), from the truncated σ_b². */
  icc: number
  /** F-based confidence interval of ICC(1), clipped to [0, 1]. */
  iccCi: [number, number]
  confidence: number
}

/**
 * One-way random-effects analysis of variance: how much of the spread lies between groups
 * (clusters) and how much within, and the intraclass correlation ICC(1) with its confidence
 * interval. Works for balanced and unbalanced groups.
 *
 * Formulas (Searle 1971, Linear Models, ch. 9; Lessells & Boag 1987, The Auk 104:116):
 *   MSB = Σ n_i (ȳ_i − ȳ)² / (k − 1),  MSW = Σ Σ (y_ij − ȳ_i)² / (N − k),  F = MSB / MSW
 *   n0 = (N − Σ n_i² / N) / (k − 1)
 *   σ_b² = (MSB − MSW) / n0 (reported as 0 when negative), σ_w² = MSW
 *   ICC(1) = σ_b² / (σ_b² + σ_w²)
 *   CI: F_L = F / F_{1−α/2}(k − 1, N − k), F_U = F · F_{1−α/2}(N − k, k − 1),
 *       bounds (F_x − 1) / (F_x + n0 − 1), clipped to [0, 1].
 * The interval is exact for balanced normal data and an approximation (with n0) otherwise.
 *
 * Guard errors: fewer than two groups, an empty group, no within-group degrees of freedom,
 * non-finite values, a confidence level outside (0, 1), all values identical.
 *
 * @example
 * oneWayAnova([[1545, 1440, 1440, 1520, 1580], [1540, 1555, 1490, 1560, 1495],
 *   [1595, 1550, 1605, 1510, 1560], [1445, 1440, 1595, 1465, 1545],
 *   [1595, 1630, 1515, 1635, 1625], [1520, 1455, 1450, 1480, 1445]])
 * // → { msb: 11271.5, msw: 2451.25, f: 4.598, p: 0.0044, n0: 5, varianceBetween: 1764.05,
 * //     icc: 0.4185, iccCi: [0.0838, 0.8479], … }   (Dyestuff)
 */
export function oneWayAnova(groups: number[][], options: OneWayAnovaOptions = {}): OneWayAnovaResult {
  const confidence = options.confidence ?? 0.95
  if (!(confidence > 0 && confidence < 1)) {
    throw new EngineInputError(`oneWayAnova: confidence must be between 0 and 1, got ${confidence}`)
  }
  if (!Array.isArray(groups) || groups.length < 2) {
    throw new EngineInputError('oneWayAnova requires at least two groups')
  }
  const k = groups.length
  let n = 0
  let grandSum = 0
  let sumSquaredSizes = 0
  const means: number[] = []
  for (let i = 0; i < k; i++) {
    const group = groups[i]
    if (!Array.isArray(group) || group.length === 0) {
      throw new EngineInputError(`oneWayAnova: group ${i + 1} has no observations`)
    }
    let sum = 0
    for (const value of group) {
      if (typeof value !== 'number' || !Number.isFinite(value)) {
        throw new EngineInputError(`oneWayAnova: group ${i + 1} contains a value that is not a finite number`)
      }
      sum += value
    }
    means.push(sum / group.length)
    n += group.length
    grandSum += sum
    sumSquaredSizes += group.length * group.length
  }
  const dfBetween = k - 1
  const dfWithin = n - k
  if (dfWithin < 1) {
    throw new EngineInputError('oneWayAnova requires at least one group with two or more observations')
  }
  const grandMean = grandSum / n
  let ssBetween = 0
  let ssWithin = 0
  for (let i = 0; i < k; i++) {
    const group = groups[i]
    ssBetween += group.length * (means[i] - grandMean) ** 2
    for (const value of group) ssWithin += (value - means[i]) ** 2
  }
  if (ssBetween + ssWithin === 0) {
    throw new EngineInputError('oneWayAnova: all values are identical, so there is no variation to split')
  }
  const msb = ssBetween / dfBetween
  const msw = ssWithin / dfWithin
  const n0 = (n - sumSquaredSizes / n) / (k - 1)
  const varianceBetweenRaw = (msb - msw) / n0
  const varianceBetweenTruncated = varianceBetweenRaw < 0
  const varianceBetween = varianceBetweenTruncated ? 0 : varianceBetweenRaw
  const varianceWithin = msw
  const icc = varianceBetween / (varianceBetween + varianceWithin)

  let f: number
  let p: number
  let iccCi: [number, number]
  if (msw === 0) {
    // Every group is constant but the groups differ: all variation is between groups.
    f = Infinity
    p = 0
    iccCi = [1, 1]
  } else {
    f = msb / msw
    p = fUpperP(f, dfBetween, dfWithin)
    const tail = (1 + confidence) / 2
    const fLow = f / fQuantile(tail, dfBetween, dfWithin)
    const fHigh = f * fQuantile(tail, dfWithin, dfBetween)
    iccCi = [clip01((fLow - 1) / (fLow + n0 - 1)), clip01((fHigh - 1) / (fHigh + n0 - 1))]
  }

  return {
    k,
    n,
    msb,
    msw,
    dfBetween,
    dfWithin,
    f,
    p,
    n0,
    varianceBetween,
    varianceBetweenRaw,
    varianceBetweenTruncated,
    varianceWithin,
    icc,
    iccCi,
    confidence,
  }
}

function clip01(x: number): number {
  return Math.min(1, Math.max(0, x))
}
