/**
 * The residual variance on the latent (link) scale of a binary or count model, the denominator
 * of latent-scale variance shares and ICCs: π²/3 for the logit link (the variance of the
 * standard logistic distribution), and ln(1 + 1/λ) for the log link (lognormal approximation),
 * where λ is the mean count, estimated as exp(mean linear predictor + ½ Σ random variances).
 *
 * Source: Nakagawa, Johnson & Schielzeth (2017), J R Soc Interface 14:20170213, table 1 and eq.
 * 5.8 (log link, lognormal approximation).
 *
 * Guard errors: none.
 *
 * @example
 * latentResidualVariance('logit', 0, 0)      // → 3.2899 (π²/3)
 * latentResidualVariance('log', 0.23, 1.85)  // → ln(1 + 1/exp(0.23 + 0.925)) = 0.274
 */
export function latentResidualVariance(
  link: 'logit' | 'log',
  meanLinearPredictor: number,
  randomVariance: number,
): number {
  if (link === 'logit') return (Math.PI * Math.PI) / 3
  const lambda = Math.exp(meanLinearPredictor + randomVariance / 2)
  return Math.log1p(1 / lambda)
}
