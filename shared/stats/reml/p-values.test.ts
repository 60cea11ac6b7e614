import { describe, expect, it } from 'vitest'
import { fUpperP } from './f-upper-p'
import { studentTTwoSidedP } from './student-t-two-sided-p'

describe('t and F tail probabilities', () => {
  it("match R's pt and pf, also far in the tail", () => {
    // R 4.x: 2*pt(-2.1, 7.3) = 0.0722467134; 2*pt(-10, 5) = 1.70947575743e-04;
    // 2*pt(-40, 3000) = 8.66015954944e-281; pf(4.2, 2, 13.7, lower = FALSE) = 0.0377962584721.
    expect(studentTTwoSidedP(2.1, 7.3) / 0.0722467134).toBeCloseTo(1, 7)
    expect(studentTTwoSidedP(-10, 5) / 1.70947575743e-4).toBeCloseTo(1, 9)
    expect(studentTTwoSidedP(40, 3000) / 8.66015954944e-281).toBeCloseTo(1, 9)
    expect(fUpperP(4.2, 2, 13.7) / 0.0377962584721).toBeCloseTo(1, 9)
    expect(studentTTwoSidedP(0, 4)).toBe(1)
    expect(fUpperP(0, 2, 4)).toBe(1)
  })

  it('returns NaN for impossible degrees of freedom', () => {
    expect(studentTTwoSidedP(1, 0)).toBeNaN()
    expect(fUpperP(1, 2, -1)).toBeNaN()
  })
})
