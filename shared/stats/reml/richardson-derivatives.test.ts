import { describe, expect, it } from 'vitest'
import { richardsonDerivatives } from './richardson-derivatives'

describe('richardsonDerivatives', () => {
  it('differentiates smooth functions to near machine precision', () => {
    // Calculus: f = exp(a) sin(b) has ∂²f/∂a² = f, ∂²f/∂a∂b = exp(a) cos(b), ∂²f/∂b² = −f.
    const x = [0.3, 1.1]
    const { hessian, jacobian } = richardsonDerivatives(
      x,
      0.1,
      (v) => Math.exp(v[0]) * Math.sin(v[1]),
      (v) => [v[0] * v[1], Math.log(v[1])],
    )
    const f = Math.exp(0.3) * Math.sin(1.1)
    expect(hessian![0][0]).toBeCloseTo(f, 10)
    expect(hessian![0][1]).toBeCloseTo(Math.exp(0.3) * Math.cos(1.1), 10)
    expect(hessian![1][1]).toBeCloseTo(-f, 10)
    expect(jacobian![0]).toEqual([expect.closeTo(1.1, 11), expect.closeTo(0, 11)])
    expect(jacobian![1][1]).toBeCloseTo(1 / 1.1, 10)
  })
})
