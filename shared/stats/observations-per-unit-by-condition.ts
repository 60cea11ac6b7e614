import type { RandomLevel } from './types'

/**
 * For each condition, the number of its observations in each unit of a level that holds any
 * (units without that condition are left out, so every size is ≥ 1). One pass over the
 * observations, whatever the number of conditions.
 *
 * @example
 * observationsPerUnitByCondition({ nUnits: 2, unitOfObs: Int32Array.from([0, 0, 1]) }, Int32Array.from([0, 1, 1]), 2)
 * // → [[1], [1, 1]]
 */
export function observationsPerUnitByCondition(
  level: Pick<RandomLevel, 'nUnits' | 'unitOfObs'>,
  codes: Int32Array,
  nConditions: number,
): number[][] {
  const counts = new Float64Array(level.nUnits * nConditions)
  const units = level.unitOfObs
  for (let i = 0; i < units.length; i++) counts[units[i] * nConditions + codes[i]]++
  const sizes: number[][] = Array.from({ length: nConditions }, () => [])
  for (let u = 0; u < level.nUnits; u++) {
    for (let c = 0; c < nConditions; c++) {
      const n = counts[u * nConditions + c]
      if (n > 0) sizes[c].push(n)
    }
  }
  return sizes
}
