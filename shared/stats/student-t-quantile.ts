import quantile from '@stdlib/stats-base-dists-t-quantile'

/** Lower-tail quantile of Student's t with df degrees of freedom (non-integer df allowed). */
export function studentTQuantile(p: number, df: number): number {
  return quantile(p, df)
}
