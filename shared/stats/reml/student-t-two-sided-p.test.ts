import { describe, expect, it } from 'vitest'
import { studentTTwoSidedP } from './student-t-two-sided-p'

// References: R 4.2.2, 2 * pt(-abs(t), df) (df = Inf: 2 * pnorm(-abs(t))).
const twoSided: [t: number, df: number, p: number][] = [
  [2.1, 7.3, 0.072246713424853351],
  [-0.01, 1717993, 0.99202128853186555],
  [11.4, 198, 1.796401411020265e-23],
  [-37, 1e8, 1.1504999776823746e-299],
  [4, Infinity, 6.3342483666239849e-5],
  [1e200, 1, 6.36619772367559e-201],
]

describe('studentTTwoSidedP', () => {
  it.each(twoSided)('2 · P(T ≥ |%s| | df %s) matches R to 1e-10 relative', (t, df, p) => {
    expect(Math.abs(studentTTwoSidedP(t, df) / p - 1)).toBeLessThan(1e-10)
  })

  it('keeps the p-value of a tiny t at huge df below 1 and above 0.99 (jStat gave 1.068)', () => {
    // R 4.2.2: 2 * pt(-0.01, 1717993) = 0.99202128853186555; jStat's cdf 0.466 made 2(1 − cdf) = 1.068.
    const p = studentTTwoSidedP(0.01, 1717993)
    expect(p).toBeGreaterThan(0.99)
    expect(p).toBeLessThan(1)
  })

  it('is 1 at t = 0, 0 only for an infinite t, NaN for impossible arguments', () => {
    expect(studentTTwoSidedP(0, 4)).toBe(1)
    expect(studentTTwoSidedP(Infinity, 4)).toBe(0)
    expect(studentTTwoSidedP(-Infinity, 4)).toBe(0)
    expect(studentTTwoSidedP(1, 0)).toBeNaN()
    expect(studentTTwoSidedP(Number.NaN, 4)).toBeNaN()
  })
})
