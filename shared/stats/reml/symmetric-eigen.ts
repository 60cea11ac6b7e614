export interface SymmetricEigen {
  /** Eigenvalues, largest first. */
  values: number[]
  /** vectors[i] is the unit eigenvector of values[i]. */
  vectors: number[][]
}

/**
 * Eigen-decomposition of a small symmetric matrix by cyclic Jacobi rotations (accurate to
 * rounding for the few-by-few matrices of variance parameters and contrasts).
 *
 * Source: Golub & Van Loan (2013), Matrix Computations, 4th ed., §8.5 (cyclic Jacobi).
 *
 * Guard errors: none; the input is assumed symmetric (only its lower triangle is read).
 *
 * @example
 * symmetricEigen([[2, 1], [1, 2]]).values // → [3, 1]
 */
export function symmetricEigen(matrix: number[][]): SymmetricEigen {
  const n = matrix.length
  const a = matrix.map((row, i) => row.map((_, j) => (j <= i ? matrix[i][j] : matrix[j][i])))
  const v: number[][] = a.map((_, i) => a.map((__, j) => (i === j ? 1 : 0)))
  for (let sweep = 0; sweep < 100; sweep++) {
    let off = 0
    let diag = 0
    for (let i = 0; i < n; i++) {
      diag += a[i][i] * a[i][i]
      for (let j = 0; j < i; j++) off += a[i][j] * a[i][j]
    }
    if (off <= 1e-32 * diag || off === 0) break
    for (let p = 0; p < n - 1; p++) {
      for (let q = p + 1; q < n; q++) {
        if (a[p][q] === 0) continue
        const tau = (a[q][q] - a[p][p]) / (2 * a[p][q])
        const t = Math.sign(tau || 1) / (Math.abs(tau) + Math.sqrt(1 + tau * tau))
        const c = 1 / Math.sqrt(1 + t * t)
        const s = t * c
        for (let k = 0; k < n; k++) {
          const akp = a[k][p]
          const akq = a[k][q]
          a[k][p] = c * akp - s * akq
          a[k][q] = s * akp + c * akq
        }
        for (let k = 0; k < n; k++) {
          const apk = a[p][k]
          const aqk = a[q][k]
          a[p][k] = c * apk - s * aqk
          a[q][k] = s * apk + c * aqk
        }
        for (let k = 0; k < n; k++) {
          const vkp = v[k][p]
          const vkq = v[k][q]
          v[k][p] = c * vkp - s * vkq
          v[k][q] = s * vkp + c * vkq
        }
      }
    }
  }
  const order = a.map((_, i) => i).sort((i, j) => a[j][j] - a[i][i])
  return { values: order.map((i) => a[i][i]), vectors: order.map((i) => v.map((row) => row[i])) }
}
