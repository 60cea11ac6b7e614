/** A response distribution with its canonical link, as the GLMM fit needs it. */
export interface GlmmFamily {
  name: 'binomial' | 'poisson'
  link: 'logit' | 'log'
  /** Mean of one trial / one observation from the linear predictor. */
  mean(eta: number): number
  /**
   * Deviance contribution of one cell: `y` successes in `n` trials (binomial) or a count sum over
   * `n` observations (Poisson), at mean `mu` per trial / observation.
   */
  deviance(y: number, n: number, mu: number): number
  /** Working weight of one trial / observation at mean mu (canonical link: the variance). */
  weight(mu: number): number
}

const xlogy = (x: number, y: number) => (x === 0 ? 0 : x * Math.log(y))

/**
 * Binomial with the logit link and Poisson with the log link: means, unit deviances and IRLS
 * weights (for a canonical link the weight is the variance function).
 *
 * Source: McCullagh & Nelder (1989), Generalized Linear Models, 2nd ed., tables 2.1 and 2.2.
 */
export const FAMILIES: Record<GlmmFamily['name'], GlmmFamily> = {
  binomial: {
    name: 'binomial',
    link: 'logit',
    mean: (eta) => (eta >= 0 ? 1 / (1 + Math.exp(-eta)) : Math.exp(eta) / (1 + Math.exp(eta))),
    deviance: (y, n, mu) => 2 * (xlogy(y, y / (n * mu)) + xlogy(n - y, (n - y) / (n * (1 - mu)))),
    weight: (mu) => mu * (1 - mu),
  },
  poisson: {
    name: 'poisson',
    link: 'log',
    mean: (eta) => Math.exp(eta),
    deviance: (y, n, mu) => 2 * (xlogy(y, y / (n * mu)) - (y - n * mu)),
    weight: (mu) => mu,
  },
}
