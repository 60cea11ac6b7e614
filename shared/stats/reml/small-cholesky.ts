/**
 * Cholesky factor L (lower triangular, row-major) of a small symmetric positive definite n × n
 * matrix given row-major. A non-positive pivot gives NaN entries (callers check the result).
 *
 * Source: Golub & Van Loan (2013), Matrix Computations, 4th ed., algorithm 4.2.1.
 *
 * @example
 * cholesky(Float64Array.from([4, 2, 2, 5]), 2) // → [2, 0, 1, 2]
 */
export function cholesky(A: ArrayLike<number>, n: number): Float64Array {
  const L = new Float64Array(n * n)
  choleskyInto(A, 0, n, L)
  return L
}

/** `cholesky` of the n × n matrix starting at A[offset], written into L (its upper triangle set to 0). */
export function choleskyInto(A: ArrayLike<number>, offset: number, n: number, L: Float64Array): void {
  for (let j = 0; j < n; j++) {
    let s = A[offset + j * n + j]
    for (let k = 0; k < j; k++) s -= L[j * n + k] * L[j * n + k]
    const d = Math.sqrt(s)
    L[j * n + j] = d
    for (let k = j + 1; k < n; k++) L[j * n + k] = 0
    for (let i = j + 1; i < n; i++) {
      let t = A[offset + i * n + j]
      for (let k = 0; k < j; k++) t -= L[i * n + k] * L[j * n + k]
      L[i * n + j] = t / d
    }
  }
}

/**
 * Solves (L Lᵀ) X = R for X, with L from `cholesky` and R an n × r row-major right-hand side.
 *
 * @example
 * solveCholesky(cholesky(Float64Array.from([4, 2, 2, 5]), 2), 2, Float64Array.from([2, 3]), 1) // → [0.25, 0.5]
 */
export function solveCholesky(L: Float64Array, n: number, R: ArrayLike<number>, r: number): Float64Array {
  const X = Float64Array.from(R as ArrayLike<number>)
  solveCholeskyInto(L, n, X, r)
  return X
}

/** `solveCholesky` in place: X holds the right-hand side on entry and the solution on return. */
export function solveCholeskyInto(L: Float64Array, n: number, X: Float64Array, r: number): void {
  for (let c = 0; c < r; c++) {
    for (let i = 0; i < n; i++) {
      let t = X[i * r + c]
      for (let k = 0; k < i; k++) t -= L[i * n + k] * X[k * r + c]
      X[i * r + c] = t / L[i * n + i]
    }
    for (let i = n - 1; i >= 0; i--) {
      let t = X[i * r + c]
      for (let k = i + 1; k < n; k++) t -= L[k * n + i] * X[k * r + c]
      X[i * r + c] = t / L[i * n + i]
    }
  }
}

/**
 * Inverse of a small symmetric positive definite matrix, by its Cholesky factor.
 *
 * @example
 * invertSpd([[4, 2], [2, 5]]) // → [[0.3125, -0.125], [-0.125, 0.25]]
 */
export function invertSpd(A: number[][]): number[][] {
  const n = A.length
  const L = cholesky(A.flat(), n)
  const identity = new Float64Array(n * n)
  for (let i = 0; i < n; i++) identity[i * n + i] = 1
  const X = solveCholesky(L, n, identity, n)
  return Array.from({ length: n }, (_, i) => Array.from(X.subarray(i * n, (i + 1) * n)))
}
