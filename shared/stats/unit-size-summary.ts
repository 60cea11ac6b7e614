import { EngineInputError } from './engine-input-error'

/**
 * Mean size m̄ and coefficient of variation cv of a set of unit (cluster) sizes, as used by the
 * design-effect formulas. The SD has divisor k (the number of units), so that
 * (cv² + 1) · m̄ = Σ m_i² / Σ m_i exactly (Kerry & Bland 2001, Stat Med 20:377).
 *
 * Guard errors: no sizes, or a size that is not a positive finite number. `caller` names the
 * public function in the message.
 *
 * @example
 * unitSizeSummary([10, 20, 30], 'designEffect') // → { meanSize: 20, cv: 0.40825 }
 */
export function unitSizeSummary(sizes: number[], caller: string): { meanSize: number; cv: number } {
  if (!Array.isArray(sizes) || sizes.length === 0) {
    throw new EngineInputError(`${caller} requires at least one unit size`)
  }
  let sum = 0
  for (const size of sizes) {
    if (typeof size !== 'number' || !Number.isFinite(size) || size <= 0) {
      throw new EngineInputError(`${caller}: every unit size must be a positive number, got ${size}`)
    }
    sum += size
  }
  const meanSize = sum / sizes.length
  let squares = 0
  for (const size of sizes) squares += (size - meanSize) ** 2
  const cv = Math.sqrt(squares / sizes.length) / meanSize
  return { meanSize, cv }
}
