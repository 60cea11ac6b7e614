import type { NestedDesign, NestedFit } from '../types'
import { evaluateNestedReml } from './evaluate-nested-reml'
import { richardsonDerivatives } from './richardson-derivatives'
import { nestedSufficientStats } from './sufficient-stats'
import { symmetricEigen } from './symmetric-eigen'

/** What every Satterthwaite degree-of-freedom computation of one fit shares. */
export interface SatterthwaiteIngredients {
  /** Random levels whose variance is positive (boundary ones are left out), then the residual. */
  parameters: string[]
  /** A = 2 H⁻¹ (pseudo-inverse), the asymptotic covariance of the log variances. */
  covariance: number[][]
  /** jacobians[i][r][c]: derivative of Cov(β̂)[r][c] with respect to log variance i. */
  jacobians: number[][][]
}

const LOG_2PI = Math.log(2 * Math.PI)
const cache = new WeakMap<NestedFit, SatterthwaiteIngredients>()

/**
 * The ingredients of Satterthwaite's degrees of freedom for a REML fit: the Hessian H of the
 * unprofiled −2 log restricted likelihood with respect to the variance parameters and the
 * Jacobian of Cov(β̂) = σ² (Xᵀ H⁻¹ X)⁻¹ with respect to the same parameters, both by Richardson-
 * extrapolated central differences. The parameters are the logs of the positive variances
 * (σ_l² > 0, then σ²); at the optimum the resulting degrees of freedom do not depend on this
 * choice, and a variance estimated at 0 is left out as lmerTest effectively does (its derivatives
 * vanish there in lme4's parameterisation).
 *
 *   −2ℓ_R(φ) = log |H| + log |Xᵀ H⁻¹ X| + (n − p) log σ² + r² / σ² + (n − p) log 2π,  θ_l = σ_l² / σ²
 *
 * Source: Kuznetsova, Brockhoff & Christensen (2017), J Stat Softw 82(13), §3 (A = 2H⁻¹, the
 * Jacobian of Cov(β̂)); Satterthwaite (1946), Biometrics Bulletin 2:110. Cached per fit.
 *
 * Guard errors: none.
 *
 * @example
 * satterthwaiteIngredients(design, fit).parameters // → ['Batch', 'residual']
 */
export function satterthwaiteIngredients(design: NestedDesign, fit: NestedFit): SatterthwaiteIngredients {
  const hit = cache.get(fit)
  if (hit) return hit
  const stats = nestedSufficientStats(design)
  const K = stats.nTheta
  const dfRes = stats.nObs - stats.p
  const free = fit.theta.flatMap((t, l) => (t > 0 ? [l] : []))
  const x0 = [...free.map((l) => Math.log(fit.theta[l] * fit.sigma2)), Math.log(fit.sigma2)]

  const thetaAt = (x: number[]) => {
    const sigma2 = Math.exp(x[x.length - 1])
    const theta = new Array<number>(K).fill(0)
    free.forEach((l, i) => (theta[l] = Math.exp(x[i]) / sigma2))
    return { sigma2, theta }
  }
  const minus2LogLik = (x: number[]) => {
    const { sigma2, theta } = thetaAt(x)
    const ev = evaluateNestedReml(stats, theta)
    return ev.logDetH + ev.logDetXtHX + dfRes * Math.log(sigma2) + ev.r2 / sigma2 + dfRes * LOG_2PI
  }
  const covBeta = (x: number[]) => {
    const { sigma2, theta } = thetaAt(x)
    return evaluateNestedReml(stats, theta, true)
      .xtHxInverse!.flat()
      .map((v) => v * sigma2)
  }
  const { hessian, jacobian } = richardsonDerivatives(x0, 0.1, minus2LogLik, covBeta)

  const eig = symmetricEigen(hessian!)
  const tol = 1e-10 * Math.max(Math.abs(eig.values[0]), 1e-300)
  const covariance = x0.map(() => new Array<number>(x0.length).fill(0))
  eig.values.forEach((d, e) => {
    if (!(d > tol)) return
    const v = eig.vectors[e]
    for (let i = 0; i < v.length; i++)
      for (let j = 0; j < v.length; j++) covariance[i][j] += (2 * v[i] * v[j]) / d
  })
  const p = stats.p
  const result: SatterthwaiteIngredients = {
    parameters: [...free.map((t) => design.terms[t].name), 'residual'],
    covariance,
    jacobians: jacobian!.map((flat) => Array.from({ length: p }, (_, r) => flat.slice(r * p, (r + 1) * p))),
  }
  cache.set(fit, result)
  return result
}
