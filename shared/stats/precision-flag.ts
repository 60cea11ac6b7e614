/** ISO 5725-2 wording: beyond the 5% critical value a "straggler", beyond the 1% value an "outlier". */
export type PrecisionFlag = 'ok' | 'straggler' | 'outlier'

/**
 * Classifies a test statistic against its 5% and 1% critical values as ISO 5725-2 (§7.3.2)
 * does: above the 1% value an outlier, above the 5% value (up to the 1% value) a straggler,
 * else correct. Pass |h| for two-sided statistics.
 *
 * @example
 * precisionFlag(2.1, 1.8, 2.18) // → 'straggler'
 */
export function precisionFlag(statistic: number, critical5: number, critical1: number): PrecisionFlag {
  if (statistic > critical1) return 'outlier'
  if (statistic > critical5) return 'straggler'
  return 'ok'
}
