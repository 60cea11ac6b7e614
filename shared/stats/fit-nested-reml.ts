import { EngineInputError } from './engine-input-error'
import { evaluateNestedReml } from './reml/evaluate-nested-reml'
import { minimiseNewton } from './reml/minimise-newton'
import { nestedSufficientStats, type NestedSufficientStats } from './reml/sufficient-stats'
import type { NestedDesign, NestedFit } from './types'

/** Below this standard-deviation ratio √θ a component is tried at exactly 0 (lme4's isSingular uses 1e-4 too). */
const SNAP_T = 1e-4

/**
 * Fits the linear mixed model y = Xβ + Σ_t Z_t u_t + e with the random intercepts of the maximal
 * nested design (each given level and each level × condition term; u_t ~ N(0, σ_t² I),
 * e ~ N(0, σ² I)) and the fixed effects A * B + covariates in treatment coding, by restricted
 * maximum likelihood (REML).
 *
 * The rows are read once into per-unit sums; each evaluation of the profiled REML criterion
 * d(θ) = log |H| + log |Xᵀ H⁻¹ X| + (n − p)(1 + log(2π r² / (n − p))), H = I + Σ θ_t Z_t Z_tᵀ,
 * then costs O(cells · p²) (nested Woodbury updates, see evaluateNestedReml). d is
 * minimised over t = √θ (unconstrained, so θ_l ≥ 0 holds by construction) with damped
 * Newton steps from the best point of a small grid; components whose √θ ends below 1e-4 are
 * tried at exactly 0 and kept there when that does not raise d, so boundary fits are exact.
 * Then σ² = r² / (n − p), σ_t² = θ_t σ², Cov(β̂) = σ² (Xᵀ H⁻¹ X)⁻¹.
 *
 * Sources: Patterson & Thompson (1971), Biometrika 58:545 (REML); Bates, Mächler, Bolker &
 * Walker (2015), J Stat Softw 67(1) (the profiled criterion, same scale as lme4's
 * "REML criterion at convergence"); Searle, Casella & McCulloch (1992), Variance Components.
 *
 * Guard errors (EngineInputError): a response with no variation left after the fixed effects
 * (r² = 0), fewer observations than fixed effects + 1, or covariates the conditions determine.
 *
 * @example
 * fitNestedReml(prepareNestedDesign(dyestuffColumns)).components
 * // → [{ level: 'Batch', variance: 1764.05 }, { level: 'residual', variance: 2451.25 }] (lme4: same)
 */
export function fitNestedReml(design: NestedDesign): NestedFit {
  const stats = nestedSufficientStats(design)
  const { p, nObs, nTheta: K } = stats
  if (nObs - p < 1) {
    throw new EngineInputError(
      `${nObs} observations cannot estimate ${p} fixed effects and a residual variance.`,
    )
  }
  const flat = evaluateNestedReml(stats, new Array(K).fill(0))
  if (flat.collinear) throw collinearFixedEffects(design)
  if (!(flat.r2 > 1e-12 * totalSumOfSquares(design.y))) {
    throw new EngineInputError(
      `The response "${design.responseName}" does not vary within conditions; variances cannot be estimated.`,
      design.responseName,
    )
  }

  const criterion = (t: number[]) =>
    evaluateNestedReml(
      stats,
      t.map((v) => v * v),
    ).deviance
  let best = minimiseNewton(criterion, bestGridStart(criterion, K))
  let iterations = best.iterations

  // Boundary: components near zero are tried at exactly zero, the others re-optimised.
  for (let i = 0; i < K; i++) {
    if (Math.abs(best.x[i]) >= SNAP_T && best.x[i] * best.x[i] >= 1e-2) continue
    const start = [...best.x]
    start[i] = 0
    const fixed = start.map((_, j) => j === i || start[j] === 0)
    const trial = minimiseNewton(criterion, start, { fixed })
    iterations += trial.iterations
    const tolerance = Math.abs(best.x[i]) < SNAP_T ? 1e-10 * Math.max(1, Math.abs(best.f)) : 0
    if (trial.f <= best.f + tolerance) best = { ...trial, converged: trial.converged && best.converged }
  }

  const theta = best.x.map((t) => t * t)
  return assembleFit(design, stats, theta, best.converged, iterations)
}

function totalSumOfSquares(y: Float64Array): number {
  let mean = 0
  for (let i = 0; i < y.length; i++) mean += y[i]
  mean /= y.length
  let ss = 0
  for (let i = 0; i < y.length; i++) ss += (y[i] - mean) ** 2
  return ss
}

/** A covariate that the factors (or the other covariates) determine exactly: X has no full rank. */
function collinearFixedEffects(design: NestedDesign): EngineInputError {
  const names = design.covariates.map((c) => c.name)
  return new EngineInputError(
    names.length > 0
      ? `The covariate${names.length > 1 ? 's' : ''} ${names.map((n) => `"${n}"`).join(', ')} ${names.length > 1 ? 'are' : 'is'} fully determined by the conditions or by each other, so ${names.length > 1 ? 'their' : 'its'} slope cannot be estimated.`
      : 'The fixed effects cannot be estimated: the conditions are confounded.',
    names[0] ?? null,
  )
}

/**
 * The best of a small grid of starting points: the full grid over √θ for up to three terms, and
 * beyond that (the grid would grow as 4^K) the common scalings of all terms plus each term
 * alone scaled up or down.
 */
function bestGridStart(criterion: (t: number[]) => number, K: number): number[] {
  if (K > 3) return bestOfPoints(criterion, wideStarts(K))
  const values = [0.1, 0.4, 1.6, 6.4]
  let best = new Array(K).fill(1)
  let bestF = criterion(best)
  const point = new Array(K).fill(0)
  const total = values.length ** K
  for (let code = 0; code < total; code++) {
    let c = code
    for (let i = 0; i < K; i++) {
      point[i] = values[c % values.length]
      c = Math.floor(c / values.length)
    }
    const f = criterion(point)
    if (f < bestF) {
      bestF = f
      best = [...point]
    }
  }
  return best
}

function wideStarts(K: number): number[][] {
  const points: number[][] = []
  for (const v of [0.1, 0.4, 1, 1.6, 6.4]) points.push(new Array(K).fill(v))
  for (let i = 0; i < K; i++) {
    for (const v of [0.05, 4]) {
      const point = new Array(K).fill(0.7)
      point[i] = v
      points.push(point)
    }
  }
  return points
}

function bestOfPoints(criterion: (t: number[]) => number, points: number[][]): number[] {
  let best = points[0]
  let bestF = criterion(best)
  for (const point of points.slice(1)) {
    const f = criterion(point)
    if (f < bestF) {
      bestF = f
      best = point
    }
  }
  return [...best]
}

function assembleFit(
  design: NestedDesign,
  stats: NestedSufficientStats,
  theta: number[],
  converged: boolean,
  iterations: number,
): NestedFit {
  const { p, nObs } = stats
  const ev = evaluateNestedReml(stats, theta, true)
  const sigma2 = ev.r2 / (nObs - p)
  return {
    beta: ev.beta!,
    vcovBeta: ev.xtHxInverse!.map((row) => row.map((v) => v * sigma2)),
    sigma2,
    components: [
      ...design.terms.map((term, i) => ({ level: term.name, variance: theta[i] * sigma2 })),
      { level: 'residual', variance: sigma2 },
    ],
    theta,
    singular: theta.some((t) => t === 0),
    remlCriterion: ev.deviance,
    converged,
    iterations,
    nObs,
    nFixed: p,
  }
}
