import { normalQuantile } from './normal-quantile'
import { normalUpperP } from './normal-upper-p'

export interface WaldTest {
  estimate: number
  se: number
  z: number
  /** Two-sided, from the standard normal. */
  p: number
  /** Confidence interval on the same (link) scale. */
  ci: [number, number]
}

/**
 * Wald z test and interval of one linear combination lᵀβ of fixed effects with covariance C, the
 * inference glmer's summary gives for binary and count models (no df: the normal reference).
 *
 *   z = lᵀβ̂ / √(lᵀCl),  p = 2 Φ(−|z|),  CI = lᵀβ̂ ± z_{1−α/2} √(lᵀCl)
 *
 * Source: Wald (1943), Trans Am Math Soc 54:426; Bates, Mächler, Bolker & Walker (2015), J Stat
 * Softw 67(1) (glmer's summary).
 *
 * @example
 * waldTest([2.2959, -1.2021, -0.7095], vcov, [0, 1, 0]) // bacteria, drug vs placebo → { z: −2.06, p: 0.039, … }
 */
export function waldTest(beta: number[], vcov: number[][], l: number[], confidence = 0.95): WaldTest {
  const estimate = l.reduce((s, v, i) => s + v * beta[i], 0)
  let variance = 0
  for (let i = 0; i < l.length; i++) for (let j = 0; j < l.length; j++) variance += l[i] * vcov[i][j] * l[j]
  const se = Math.sqrt(variance)
  const z = estimate / se
  const half = normalQuantile(1 - (1 - confidence) / 2) * se
  return {
    estimate,
    se,
    z,
    p: Math.min(1, 2 * normalUpperP(Math.abs(z))),
    ci: [estimate - half, estimate + half],
  }
}
