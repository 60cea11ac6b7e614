import { EngineInputError } from './engine-input-error'
import { FAMILIES, type GlmmFamily } from './glmm/family'
import { glmmRows, type GlmmRows } from './glmm/glmm-rows'
import { laplaceDeviance, type GlmmState } from './glmm/laplace-deviance'
import { minimiseNewton } from './reml/minimise-newton'
import { richardsonDerivatives } from './reml/richardson-derivatives'
import { invertSpd } from './reml/small-cholesky'
import type { NestedDesign, VarianceComponent } from './types'

export interface NestedGlmmFit {
  family: GlmmFamily['name']
  link: GlmmFamily['link']
  /** Fixed effects on the link scale, in the order of the design's fixed columns. */
  beta: number[]
  /** Covariance of β̂: the β block of 2 H⁻¹, H the Hessian of the Laplace deviance in (σ, β), as glmer's vcov. */
  vcovBeta: number[][]
  /** One per random term: the variance σ_t² of its intercepts on the link scale. */
  components: VarianceComponent[]
  /** True when a variance is estimated as exactly 0 (boundary fit). */
  singular: boolean
  /** The Laplace deviance at the optimum, up to a constant (Σ unit deviances + ‖u‖² + log |L|²). */
  deviance: number
  converged: boolean
  iterations: number
  /** Rows the likelihood was summed over (cells when there are no covariates). */
  nRows: number
  /** The conditional modes at the optimum: each innermost cell's random contribution. */
  innerEffect: Float64Array
  rows: GlmmRows
}

/**
 * Below this SD a term is also tried at exactly 0, and kept there when the deviance is no worse.
 * Not lme4's isSingular 1e-4: where the deviance rises only as σ⁴ from 0 (an observation-level
 * term of a 0/1 response, whose first-order slope in σ² is 0), Newton stalls near σ ≈ 3e-3, where
 * the differences it sees are rounding noise; left there, the near-zero σ-curvature inflated the
 * SEs of β by up to 8 % over the boundary fit's.
 */
const SNAP = 0.05
/** First step of the Richardson-refined differences for the Hessian, on the σ and β scales. */
const HESSIAN_STEP = 0.01

/**
 * Fits a generalised linear mixed model — binomial with the logit link or Poisson with the log
 * link — with the random intercepts of the maximal nested design and the fixed effects A * B +
 * covariates, by maximising the Laplace approximation to the marginal likelihood, as lme4's glmer
 * with its default nAGQ = 1: first the variances alone with β solved inside PIRLS (nAGQ = 0),
 * then variances and β together, each deviance evaluation running PIRLS to the conditional modes
 * (see laplaceDeviance). SDs near 0 are tried at exactly 0. Cov(β̂) is the β block of twice the
 * inverse Hessian of the deviance in (σ, β), as glmer's vcov (use.hessian = TRUE).
 *
 * Source: Bates, Mächler, Bolker & Walker (2015), J Stat Softw 67(1); Breslow & Clayton (1993),
 * J Am Stat Assoc 88:9; Tierney & Kadane (1986), J Am Stat Assoc 81:82 (Laplace).
 *
 * Guard errors (EngineInputError): a response that is all 0 or all successes (no information), a
 * Hessian that is not positive definite (the fit is not identified).
 *
 * @example
 * fitNestedGlmm(bacteriaDesign, { family: 'binomial' }).beta // → [2.78, −1.10, −0.61]-ish (glmer: same to 1e-3)
 */
export function fitNestedGlmm(
  design: NestedDesign,
  options: { family: GlmmFamily['name']; trials?: Float64Array | null },
): NestedGlmmFit {
  const family = FAMILIES[options.family]
  const rows = glmmRows(design, family, options.trials ?? null)
  checkInformation(rows, design.responseName)
  const K = design.terms.length
  const p = rows.p
  let warm: GlmmState | null = null
  let iterations = 0

  // Stage 1: the variances, with β solved jointly with the modes.
  const stage1 = (sd: number[]) => {
    const ev = laplaceDeviance(
      rows,
      sd.map((s) => s * s),
      null,
      warm,
    )
    warm = ev.state
    return ev.deviance
  }
  const first = minimiseNewton(stage1, bestStart(stage1, K))
  iterations += first.iterations
  const firstEval = laplaceDeviance(
    rows,
    first.x.map((s) => s * s),
    null,
    warm,
  )
  warm = firstEval.state

  // Stage 2: variances and β together (the nAGQ = 1 deviance).
  const joint = (x: number[]) => {
    const ev = laplaceDeviance(
      rows,
      x.slice(0, K).map((s) => s * s),
      x.slice(K),
      warm,
    )
    warm = ev.state
    return ev.deviance
  }
  let best = minimiseNewton(joint, [...first.x.map(Math.abs), ...firstEval.beta])
  iterations += best.iterations
  for (let t = 0; t < K; t++) {
    if (Math.abs(best.x[t]) >= SNAP) continue
    const start = [...best.x]
    start[t] = 0
    const trial = minimiseNewton(joint, start, {
      fixed: start.map((_, j) => j === t || (j < K && start[j] === 0)),
    })
    iterations += trial.iterations
    if (trial.f <= best.f + 1e-10 * Math.max(1, Math.abs(best.f)))
      best = { ...trial, converged: trial.converged && best.converged }
  }
  const sd = best.x.slice(0, K).map(Math.abs)
  const beta = best.x.slice(K)
  const final = laplaceDeviance(
    rows,
    sd.map((s) => s * s),
    beta,
    warm,
  )

  const { hessian } = richardsonDerivatives([...sd, ...beta], HESSIAN_STEP, joint)
  const vcovBeta = betaCovariance(hessian!, K, p, sd)
  return {
    family: family.name,
    link: family.link,
    beta,
    vcovBeta,
    components: design.terms.map((term, t) => ({ level: term.name, variance: sd[t] * sd[t] })),
    singular: sd.some((s) => s === 0),
    deviance: final.deviance,
    converged: best.converged && first.converged && final.converged,
    iterations,
    nRows: rows.nRows,
    innerEffect: final.state.innerEffect,
    rows,
  }
}

function checkInformation(rows: GlmmRows, response: string): void {
  let y = 0
  let n = 0
  for (let r = 0; r < rows.nRows; r++) {
    y += rows.y[r]
    n += rows.n[r]
  }
  if (y === 0 || (rows.family.name === 'binomial' && y === n)) {
    const what =
      rows.family.name === 'binomial' ? (y === 0 ? 'no successes' : 'only successes') : 'only zero counts'
    throw new EngineInputError(`"${response}" has ${what}, so there is nothing to compare.`, response)
  }
}

/** A few SDs per term; the best starts the Newton steps. */
function bestStart(f: (sd: number[]) => number, K: number): number[] {
  const values = K <= 3 ? [0.25, 0.7, 1.5] : [0.5, 1]
  let best = new Array(K).fill(0.7)
  let bestF = f(best)
  const total = values.length ** K
  for (let code = 0; code < total; code++) {
    let c = code
    const point = Array.from({ length: K }, () => {
      const v = values[c % values.length]
      c = Math.floor(c / values.length)
      return v
    })
    const value = f(point)
    if (value < bestF) {
      bestF = value
      best = point
    }
  }
  return best
}

/**
 * The β block of 2 H⁻¹ (as lme4's vcov.merMod with use.hessian = TRUE). A σ at exactly 0 has its
 * row left out: the deviance is even in each σ, so its cross-derivatives with β vanish there and the
 * β block is the same without it, while its own curvature can be 0 (a σ⁴ rise) and H singular.
 */
function betaCovariance(hessian: number[][], K: number, p: number, sd: number[]): number[][] {
  const keep = [...sd.flatMap((s, t) => (s > 0 ? [t] : [])), ...Array.from({ length: p }, (_, j) => K + j)]
  const at = keep.length - p
  const symmetric = keep.map((i) => keep.map((j) => (hessian[i][j] + hessian[j][i]) / 2))
  const inverse = invertSpd(symmetric)
  const block = Array.from({ length: p }, (_, i) =>
    Array.from({ length: p }, (__, j) => 2 * inverse[at + i][at + j]),
  )
  if (!block.every((row, i) => row[i] > 0 && Number.isFinite(row[i]))) {
    throw new EngineInputError(
      'The model cannot be estimated from these data: the fixed effects are not identified (for example, a condition with no successes at all).',
    )
  }
  return block
}
