import { EngineInputError } from '../engine-input-error'
import type { ThreeLevelVariances } from './three-level-variances'

/**
 * The three-level variances with σ²_lab's default (0) filled in, each checked to be a finite
 * number of at least 0; `caller` names the public function in the message.
 *
 * Guard error: "<caller>: <name> must be a number of at least 0, got <value>".
 */
export function checkThreeLevelVariances(
  input: ThreeLevelVariances,
  caller: string,
): Required<ThreeLevelVariances> {
  const variances = {
    labArmVariance: input.labArmVariance,
    unitVariance: input.unitVariance,
    residualVariance: input.residualVariance,
    labVariance: input.labVariance ?? 0,
  }
  for (const [name, value] of Object.entries(variances)) {
    if (typeof value !== 'number' || !Number.isFinite(value) || value < 0) {
      throw new EngineInputError(`${caller}: ${name} must be a number of at least 0, got ${value}`)
    }
  }
  return variances
}
