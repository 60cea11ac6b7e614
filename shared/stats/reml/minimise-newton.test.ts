import { describe, expect, it } from 'vitest'
import { minimiseNewton } from './minimise-newton'

describe('minimiseNewton', () => {
  it('finds the minimum of the Rosenbrock function', () => {
    // Rosenbrock (1960): minimum 0 at (1, 1).
    const r = minimiseNewton((x) => 100 * (x[1] - x[0] ** 2) ** 2 + (1 - x[0]) ** 2, [-1.2, 1])
    expect(r.x[0]).toBeCloseTo(1, 6)
    expect(r.x[1]).toBeCloseTo(1, 6)
    expect(r.converged).toBe(true)
  })

  it('keeps fixed coordinates', () => {
    // Common practice, no source: with x fixed at 2, (x − 1)² + (y − x)² is smallest at y = 2.
    const r = minimiseNewton((x) => (x[0] - 1) ** 2 + (x[1] - x[0]) ** 2, [2, 0], { fixed: [true, false] })
    expect(r.x[0]).toBe(2)
    expect(r.x[1]).toBeCloseTo(2, 8)
  })
})
