import { EngineInputError } from './engine-input-error'

/** One laboratory's results at one level of an interlaboratory (ISO 5725-2) study. */
export interface LabSummary {
  /** Number of test results from this laboratory. */
  n: number
  /** Mean of its results (the cell mean). */
  mean: number
  /** Standard deviation of its results (divisor n − 1; 0 when n = 1). */
  sd: number
}

/**
 * Checks a list of laboratory summaries for the ISO 5725-2 functions and returns it unchanged,
 * so every function rejects thin or malformed input the same way.
 *
 * Guard errors: fewer than `minLabs` laboratories; n not a whole number ≥ 1; a non-finite mean;
 * a negative or non-finite SD. `caller` names the public function in the message.
 *
 * @example
 * checkLabSummaries([{ n: 2, mean: 10.1, sd: 0.2 }, { n: 2, mean: 9.8, sd: 0.1 }], 2, 'labPrecision') // → the same array
 */
export function checkLabSummaries(labs: LabSummary[], minLabs: number, caller: string): LabSummary[] {
  if (!Array.isArray(labs) || labs.length < minLabs) {
    throw new EngineInputError(
      `${caller} requires at least ${minLabs} laboratories, got ${Array.isArray(labs) ? labs.length : 0}`,
    )
  }
  labs.forEach((lab, i) => {
    if (!lab || !Number.isInteger(lab.n) || lab.n < 1) {
      throw new EngineInputError(`${caller}: laboratory ${i + 1} needs a whole number of results (n ≥ 1)`)
    }
    if (typeof lab.mean !== 'number' || !Number.isFinite(lab.mean)) {
      throw new EngineInputError(`${caller}: the mean of laboratory ${i + 1} is not a finite number`)
    }
    if (typeof lab.sd !== 'number' || !Number.isFinite(lab.sd) || lab.sd < 0) {
      throw new EngineInputError(`${caller}: the SD of laboratory ${i + 1} must be a non-negative number`)
    }
  })
  return labs
}
