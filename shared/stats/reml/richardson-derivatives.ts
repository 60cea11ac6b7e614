export interface RichardsonDerivatives {
  /** Hessian of the scalar function, when asked for. */
  hessian?: number[][]
  /** jacobian[i] is the derivative of the vector function with respect to x_i. */
  jacobian?: number[][]
}

const ROUNDS = 4

/**
 * Central-difference derivatives refined by Richardson extrapolation: differences at steps
 * h, h/2, h/4, h/8 are combined so that the h², h⁴ and h⁶ error terms cancel (the scheme of
 * R's numDeriv package, which lmerTest uses). `scalar` gives the Hessian, `vector` the Jacobian.
 *
 * Source: Richardson (1911); Gilbert & Varadhan, numDeriv (R package) documentation; Nocedal &
 * Wright (2006) §8.1 for the difference formulas.
 *
 * Guard errors: none.
 *
 * @example
 * richardsonDerivatives([1, 2], 0.1, (x) => x[0] * x[0] * x[1]).hessian // → [[4, 2], [2, 0]] (to ~1e-12)
 */
export function richardsonDerivatives(
  x: number[],
  h0: number,
  scalar?: (x: number[]) => number,
  vector?: (x: number[]) => number[],
): RichardsonDerivatives {
  const k = x.length
  const shifted = (steps: [number, number][]) => {
    const y = [...x]
    for (const [i, d] of steps) y[i] += d
    return y
  }
  const result: RichardsonDerivatives = {}
  if (scalar) {
    const f0 = scalar(x)
    const tables: number[][] = []
    for (let r = 0, h = h0; r < ROUNDS; r++, h /= 2) {
      const H = Array.from({ length: k }, () => new Array<number>(k).fill(0))
      for (let i = 0; i < k; i++) {
        H[i][i] = (scalar(shifted([[i, h]])) - 2 * f0 + scalar(shifted([[i, -h]]))) / (h * h)
        for (let j = 0; j < i; j++) {
          const v =
            (scalar(
              shifted([
                [i, h],
                [j, h],
              ]),
            ) -
              scalar(
                shifted([
                  [i, h],
                  [j, -h],
                ]),
              ) -
              scalar(
                shifted([
                  [i, -h],
                  [j, h],
                ]),
              ) +
              scalar(
                shifted([
                  [i, -h],
                  [j, -h],
                ]),
              )) /
            (4 * h * h)
          H[i][j] = v
          H[j][i] = v
        }
      }
      tables.push(H.flat())
    }
    const flat = extrapolate(tables)
    result.hessian = Array.from({ length: k }, (_, i) => flat.slice(i * k, (i + 1) * k))
  }
  if (vector) {
    result.jacobian = []
    for (let i = 0; i < k; i++) {
      const tables: number[][] = []
      for (let r = 0, h = h0; r < ROUNDS; r++, h /= 2) {
        const up = vector(shifted([[i, h]]))
        const down = vector(shifted([[i, -h]]))
        tables.push(up.map((u, j) => (u - down[j]) / (2 * h)))
      }
      result.jacobian.push(extrapolate(tables))
    }
  }
  return result
}

/** Neville-style elimination of the even error powers, element by element. */
function extrapolate(tables: number[][]): number[] {
  let level = tables
  for (let m = 1; level.length > 1; m++) {
    const factor = 4 ** m
    const next: number[][] = []
    for (let r = 0; r + 1 < level.length; r++) {
      next.push(level[r + 1].map((fine, e) => (factor * fine - level[r][e]) / (factor - 1)))
    }
    level = next
  }
  return level[0]
}
