import { studentTQuantile } from '../stats/student-t-quantile'

/**
 * Two-sided confidence interval of a t-based estimate: estimate ± t(1 − α/2, df) · se.
 * The mixed-model contrasts carry estimate, SE and Satterthwaite df but not the interval itself.
 */
export function contrastInterval(
  estimate: number,
  se: number,
  df: number,
  confidence = 0.95,
): [number, number] {
  const half = studentTQuantile(1 - (1 - confidence) / 2, df) * se
  return [estimate - half, estimate + half]
}
