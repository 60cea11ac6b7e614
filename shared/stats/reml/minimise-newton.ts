export interface NewtonResult {
  x: number[]
  f: number
  iterations: number
  /** True when the last Newton step was negligible with a positive definite Hessian. */
  converged: boolean
}

export interface NewtonOptions {
  /** Coordinates held fixed at their starting value. */
  fixed?: boolean[]
  maxIterations?: number
}

/**
 * Minimises a smooth function of a few variables by damped Newton steps with central-difference
 * derivatives: the Hessian is shifted towards the identity (Levenberg–Marquardt) until it is
 * positive definite and the step lowers f, then the step is halved as needed (line search).
 * Meant for the 1–6 variance parameters of a nested model, where an evaluation is cheap.
 *
 * Source: Nocedal & Wright (2006), Numerical Optimization, 2nd ed., ch. 3.4 (Newton with
 * Hessian modification) and ch. 8.1 (finite-difference derivatives).
 *
 * Guard errors: none (a non-finite f at the start returns at once with converged = false).
 *
 * @example
 * minimiseNewton((x) => (x[0] - 1) ** 2 + 3 * (x[1] + 2) ** 2, [0, 0]).x // → [1, -2] (to ~1e-10)
 */
export function minimiseNewton(
  f: (x: number[]) => number,
  x0: number[],
  opts: NewtonOptions = {},
): NewtonResult {
  const free = x0.map((_, i) => !(opts.fixed?.[i] ?? false))
  const idx = free.flatMap((isFree, i) => (isFree ? [i] : []))
  const maxIterations = opts.maxIterations ?? 200
  let x = [...x0]
  let fx = f(x)
  if (!Number.isFinite(fx) || idx.length === 0)
    return { x, f: fx, iterations: 0, converged: idx.length === 0 }

  let converged = false
  let iterations = 0
  for (; iterations < maxIterations && !converged; iterations++) {
    const { g, H } = derivatives(f, x, fx, idx)
    // Decreases below this are rounding noise of f (a sum of terms as large as f itself).
    const noise = 1e-13 * Math.max(1, Math.abs(fx))
    let lambda = 0
    let moved = false
    for (let attempt = 0; attempt < 40 && !moved && !converged; attempt++) {
      const step = solveShifted(H, g, lambda)
      if (!step) {
        lambda = nextLambda(lambda, H)
        continue
      }
      const trialAt = (t: number) => {
        const trial = [...x]
        idx.forEach((i, j) => (trial[i] = x[i] + t * step[j]))
        return trial
      }
      if (lambda === 0) {
        const predicted = step.reduce((s, v, j) => s - 0.5 * v * g[j], 0)
        const small = step.every((v, j) => Math.abs(v) <= 1e-10 * Math.max(Math.abs(x[idx[j]]), 1e-3))
        if (small || predicted < noise) {
          // Within rounding of the optimum: keep the Newton point unless it is visibly worse.
          const trial = trialAt(1)
          const ft = f(trial)
          if (ft <= fx + noise) {
            x = trial
            fx = Math.min(fx, ft)
          }
          converged = true
          break
        }
      }
      for (let half = 0, t = 1; half < 12; half++, t /= 2) {
        const trial = trialAt(t)
        const ft = f(trial)
        if (ft < fx) {
          x = trial
          fx = ft
          moved = true
          break
        }
      }
      if (!moved) lambda = nextLambda(lambda, H)
    }
    if (!moved && !converged) {
      converged = gradientNegligible(g, H, noise)
      break
    }
  }
  return { x, f: fx, iterations, converged }
}

function nextLambda(lambda: number, H: number[][]): number {
  const scale = Math.max(...H.map((row, i) => Math.abs(row[i])), 1e-8)
  return lambda === 0 ? 1e-6 * scale : lambda * 8
}

function gradientNegligible(g: number[], H: number[][], noise: number): boolean {
  const step = solveShifted(H, g, 0)
  if (!step) return false
  return step.reduce((s, v, j) => s - 0.5 * v * g[j], 0) < 100 * noise
}

function derivatives(f: (x: number[]) => number, x: number[], fx: number, idx: number[]) {
  const h = idx.map((i) => 1e-4 * Math.max(Math.abs(x[i]), 0.05))
  const at = (deltas: [number, number][]) => {
    const y = [...x]
    for (const [j, d] of deltas) y[idx[j]] += d
    return f(y)
  }
  const k = idx.length
  const g = new Array<number>(k)
  const H = Array.from({ length: k }, () => new Array<number>(k).fill(0))
  for (let j = 0; j < k; j++) {
    const fp = at([[j, h[j]]])
    const fm = at([[j, -h[j]]])
    // One Richardson step (h and 2h) makes the gradient error O(h⁴): the optimum is where g = 0.
    const coarse = (at([[j, 2 * h[j]]]) - at([[j, -2 * h[j]]])) / (4 * h[j])
    g[j] = (4 * ((fp - fm) / (2 * h[j])) - coarse) / 3
    H[j][j] = (fp - 2 * fx + fm) / (h[j] * h[j])
    for (let l = 0; l < j; l++) {
      const v =
        (at([
          [j, h[j]],
          [l, h[l]],
        ]) -
          at([
            [j, h[j]],
            [l, -h[l]],
          ]) -
          at([
            [j, -h[j]],
            [l, h[l]],
          ]) +
          at([
            [j, -h[j]],
            [l, -h[l]],
          ])) /
        (4 * h[j] * h[l])
      H[j][l] = v
      H[l][j] = v
    }
  }
  return { g, H }
}

/** Solves (H + λI) s = −g by Cholesky; null when H + λI is not positive definite. */
function solveShifted(H: number[][], g: number[], lambda: number): number[] | null {
  const k = g.length
  const L = Array.from({ length: k }, () => new Array<number>(k).fill(0))
  for (let j = 0; j < k; j++) {
    let s = H[j][j] + lambda
    for (let q = 0; q < j; q++) s -= L[j][q] * L[j][q]
    if (!(s > 0)) return null
    L[j][j] = Math.sqrt(s)
    for (let i = j + 1; i < k; i++) {
      let t = H[i][j]
      for (let q = 0; q < j; q++) t -= L[i][q] * L[j][q]
      L[i][j] = t / L[j][j]
    }
  }
  const z = new Array<number>(k)
  for (let i = 0; i < k; i++) {
    let t = -g[i]
    for (let q = 0; q < i; q++) t -= L[i][q] * z[q]
    z[i] = t / L[i][i]
  }
  const s = new Array<number>(k)
  for (let i = k - 1; i >= 0; i--) {
    let t = z[i]
    for (let q = i + 1; q < k; q++) t -= L[q][i] * s[q]
    s[i] = t / L[i][i]
  }
  return s
}
