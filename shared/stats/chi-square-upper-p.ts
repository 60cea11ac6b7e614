import gammainc from '@stdlib/math-base-special-gammainc'
import { EngineInputError } from './engine-input-error'

/**
 * Largest df accepted. @stdlib/math-base-special-gammainc 0.3.1 is wrong by up to 5% once x/2 >
 * 1000 and df/2 < x/2 + 50 (its large-x series starts one term too high), and that region holds
 * representable tail probabilities from df ≈ 150 on (it also loses up to 7e-9 at df 1e8). Up to
 * here its error is below 2e-13 (measured against R's pchisq; see chi-square-upper-p.test.ts).
 */
export const CHI_SQUARE_MAX_DF = 150

/**
 * Upper-tail probability of the χ² distribution, P(χ²_df ≥ x), for non-integer df too.
 *
 * Formula: P(χ²_df ≥ x) = Q(df/2, x/2), the upper regularised incomplete gamma function
 * (Abramowitz & Stegun 1964, §26.4), from stdlib's gammainc asked for the upper tail directly,
 * so small p-values keep their relative precision down to about 1e-300.
 *
 * Guard errors: df above 150 (see CHI_SQUARE_MAX_DF). df ≤ 0 or a NaN input gives NaN.
 *
 * @example
 * chiSquareUpperP(8.4, 2)  // → 0.0149955768 (R: pchisq(8.4, 2, lower.tail = FALSE))
 * chiSquareUpperP(600, 3)  // → 1.00784359216456e-129 (R: pchisq(600, 3, lower.tail = FALSE))
 */
export function chiSquareUpperP(x: number, df: number): number {
  if (!(df > 0) || Number.isNaN(x)) return Number.NaN
  if (df > CHI_SQUARE_MAX_DF) {
    throw new EngineInputError(
      `chiSquareUpperP supports at most ${CHI_SQUARE_MAX_DF} degrees of freedom, got ${df}`,
    )
  }
  if (x <= 0) return 1
  if (x === Infinity) return 0
  return gammainc(x / 2, df / 2, true, true)
}
