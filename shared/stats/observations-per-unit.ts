import type { RandomLevel } from './types'

/**
 * Number of observations in each unit of a level, optionally counting only the observations of
 * one condition (units without such observations are then left out, so every size is ≥ 1).
 *
 * @example
 * observationsPerUnit({ nUnits: 2, unitOfObs: Int32Array.from([0, 0, 1]), … }) // → [2, 1]
 */
export function observationsPerUnit(
  level: Pick<RandomLevel, 'nUnits' | 'unitOfObs'>,
  only?: { codes: Int32Array; code: number },
): number[] {
  const counts = new Float64Array(level.nUnits)
  const units = level.unitOfObs
  if (only) {
    for (let i = 0; i < units.length; i++) if (only.codes[i] === only.code) counts[units[i]]++
    return Array.from(counts).filter((c) => c > 0)
  }
  for (let i = 0; i < units.length; i++) counts[units[i]]++
  return Array.from(counts)
}
