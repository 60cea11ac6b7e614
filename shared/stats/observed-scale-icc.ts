import { EngineInputError } from './engine-input-error'

export interface ObservedScaleInput {
  /** 'logit' (yes/no, binomial) or 'log' (counts, Poisson). */
  link: 'logit' | 'log'
  /** The mean on the response scale the units spread around: a proportion in (0, 1), or a rate > 0. */
  mean: number
  /** Variance of the units' random intercepts on the link (latent) scale, σ²_u ≥ 0. */
  unitVariance: number
}

export interface ObservedScaleResult {
  /** Correlation of two observations of one unit on the response scale (0/1 values or counts). */
  icc: number
  /** SD of one observation on the response scale: √(p(1 − p)) or √(λ + Var(λ_unit)). */
  sdTotal: number
  /** Linear predictor of a typical unit (random effect 0) whose units average `mean`. */
  eta: number
}

const INTEGRATION_POINTS = 801
const Z_LIMIT = 10

/** E[f(η + σZ)], Z standard normal: trapezoidal rule on [−10, 10], exponentially accurate for smooth f. */
function expectation(f: (x: number) => number, eta: number, sigma: number): number {
  const h = (2 * Z_LIMIT) / (INTEGRATION_POINTS - 1)
  let sum = 0
  for (let i = 0; i < INTEGRATION_POINTS; i++) {
    const z = -Z_LIMIT + i * h
    sum += f(eta + sigma * z) * Math.exp(-0.5 * z * z)
  }
  return (sum * h) / Math.sqrt(2 * Math.PI)
}

const logistic = (x: number) => 1 / (1 + Math.exp(-x))

/**
 * The ICC of a yes/no or count response on the scale of the observations, from the variance of
 * the units' random intercepts on the latent (link) scale: what the ICC of a GLMM (on the latent
 * scale) means for the 0/1 values or the counts themselves, which is what the design effect of a
 * difference in proportions or rates needs.
 *
 * Logit link (Goldstein, Browne & Rasbash 2002, Understanding Statistics 1:223, their simulation
 * method, integrated here numerically instead of by draws): units' proportions p_u = logistic(η + u),
 * u ~ N(0, σ²_u), with η such that E[p_u] = p; ICC = Var(p_u) / (p(1 − p)), SD = √(p(1 − p)).
 * Log link (lognormal–Poisson moments): λ_u = exp(η + u), E[λ_u] = λ, Var(λ_u) = λ²(e^{σ²_u} − 1);
 * Var(Y) = λ + Var(λ_u); ICC = Var(λ_u) / Var(Y).
 *
 * Guard errors: a proportion outside (0, 1), a rate ≤ 0, a negative or non-finite variance.
 *
 * @example
 * observedScaleIcc({ link: 'logit', mean: 0.3, unitVariance: 1 }) // → { icc: 0.1573, sdTotal: 0.4583, eta: −1.0184 }
 * observedScaleIcc({ link: 'log', mean: 5, unitVariance: 0.1 })   // → { icc: 0.3446, sdTotal: 2.7621, eta: 1.5594 }
 */
export function observedScaleIcc(input: ObservedScaleInput): ObservedScaleResult {
  const { link, mean, unitVariance } = input
  if (!(unitVariance >= 0) || !Number.isFinite(unitVariance))
    throw new EngineInputError(`observedScaleIcc: the unit variance must be 0 or more, got ${unitVariance}`)
  const sigma = Math.sqrt(unitVariance)
  if (link === 'log') {
    if (!(mean > 0) || !Number.isFinite(mean))
      throw new EngineInputError(`observedScaleIcc: a rate must be above 0, got ${mean}`)
    const between = mean * mean * Math.expm1(unitVariance)
    return {
      icc: between / (mean + between),
      sdTotal: Math.sqrt(mean + between),
      eta: Math.log(mean) - unitVariance / 2,
    }
  }
  if (!(mean > 0 && mean < 1))
    throw new EngineInputError(`observedScaleIcc: a proportion must lie between 0 and 1, got ${mean}`)
  // Newton steps on η: d/dη E[logistic(η + σZ)] = E[p(1 − p)] > 0, so the root is unique.
  let eta = Math.log(mean / (1 - mean))
  for (let step = 0; step < 100; step++) {
    const gap = expectation(logistic, eta, sigma) - mean
    const slope = expectation((x) => logistic(x) * (1 - logistic(x)), eta, sigma)
    const next = eta - gap / slope
    if (Math.abs(next - eta) < 1e-13) {
      eta = next
      break
    }
    eta = next
  }
  const second = expectation((x) => logistic(x) ** 2, eta, sigma)
  const total = mean * (1 - mean)
  return { icc: Math.max(0, second - mean * mean) / total, sdTotal: Math.sqrt(total), eta }
}
