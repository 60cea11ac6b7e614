import { describe, expect, it } from 'vitest'
import { EngineInputError } from './engine-input-error'
import { observedScaleIcc } from './observed-scale-icc'

describe('observedScaleIcc', () => {
  it('matches R’s integrate() and uniroot() for the logit link', () => {
    // R 4.2: eta solves integrate(plogis(eta + sqrt(s2) z) dnorm(z)) = p (uniroot, tol 1e-13);
    // icc = (integrate(plogis(...)^2 dnorm) − p²) / (p (1 − p)), rel.tol 1e-12.
    const cases: [number, number, number, number][] = [
      [0.3, 1, -1.018400652, 0.1572892412],
      [0.475, 0.5, -0.1113830088, 0.1013301124],
      [0.1, 2, -2.879915674, 0.1713502982],
    ]
    for (const [p, s2, eta, icc] of cases) {
      const r = observedScaleIcc({ link: 'logit', mean: p, unitVariance: s2 })
      expect(r.eta).toBeCloseTo(eta, 8)
      expect(r.icc).toBeCloseTo(icc, 8)
      expect(r.sdTotal).toBeCloseTo(Math.sqrt(p * (1 - p)), 14)
    }
  })

  it('gives the lognormal–Poisson moments for the log link', () => {
    // By hand: λ = 5, σ² = 0.1: Var(λ_u) = 25 (e^0.1 − 1) = 2.62927; Var(Y) = 7.62927.
    const r = observedScaleIcc({ link: 'log', mean: 5, unitVariance: 0.1 })
    expect(r.icc).toBeCloseTo(2.629273 / 7.629273, 6)
    expect(r.sdTotal).toBeCloseTo(Math.sqrt(7.629273), 6)
    expect(r.eta).toBeCloseTo(Math.log(5) - 0.05, 14)
  })

  it('is 0 without unit variance', () => {
    expect(observedScaleIcc({ link: 'logit', mean: 0.4, unitVariance: 0 }).icc).toBeCloseTo(0, 14)
    expect(observedScaleIcc({ link: 'log', mean: 3, unitVariance: 0 }).icc).toBe(0)
  })

  it('refuses a proportion outside (0, 1), a rate of 0 and a negative variance', () => {
    expect(() => observedScaleIcc({ link: 'logit', mean: 1, unitVariance: 1 })).toThrow(EngineInputError)
    expect(() => observedScaleIcc({ link: 'log', mean: 0, unitVariance: 1 })).toThrow(EngineInputError)
    expect(() => observedScaleIcc({ link: 'log', mean: 2, unitVariance: -1 })).toThrow(/0 or more/)
  })
})
