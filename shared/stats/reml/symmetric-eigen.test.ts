import { describe, expect, it } from 'vitest'
import { symmetricEigen } from './symmetric-eigen'

describe('symmetricEigen', () => {
  it('decomposes a symmetric matrix, largest eigenvalue first', () => {
    // From memory: [[2,1],[1,2]] has eigenvalues 3 and 1 with vectors (1,1)/√2 and (1,−1)/√2.
    const r = symmetricEigen([
      [2, 1],
      [1, 2],
    ])
    expect(r.values[0]).toBeCloseTo(3, 14)
    expect(r.values[1]).toBeCloseTo(1, 14)
    expect(Math.abs(r.vectors[0][0])).toBeCloseTo(Math.SQRT1_2, 14)
  })

  it('reconstructs the matrix from its eigenpairs', () => {
    // Common practice, no source: A = Σ d v vᵀ.
    const A = [
      [4, 1, -2],
      [1, 3, 0.5],
      [-2, 0.5, 6],
    ]
    const { values, vectors } = symmetricEigen(A)
    for (let i = 0; i < 3; i++)
      for (let j = 0; j < 3; j++)
        expect(values.reduce((s, d, e) => s + d * vectors[e][i] * vectors[e][j], 0)).toBeCloseTo(A[i][j], 12)
  })
})
