import { describe, expect, it } from 'vitest'
import { CHI_SQUARE_MAX_DF, chiSquareUpperP } from './chi-square-upper-p'

// [x, df, P(χ²_df ≥ x)] from R 4.2.2: pchisq(x, df, lower.tail = FALSE). The statistics are R's
// qchisq(p, df, lower.tail = FALSE) for p = 0.5, 1e-2, 1e-22, 1e-150 and 1e-300, rounded to four
// digits; R agrees with the exact incomplete gamma (mpmath 1.3.0, 40 digits) to 1.1e-13 here.
const upperTail: [x: number, df: number, p: number][] = [
  [0.4549, 1, 0.5000171607517763],
  [6.635, 1, 0.009999419574042495],
  [96.27, 1, 1.0023745477844673e-22],
  [683.8, 1, 9.966882464171132e-151],
  [1374, 1, 9.382576632973932e-301],
  [1.386, 2, 0.5000735956957678],
  [9.21, 2, 0.010001702004705479],
  [101.3, 2, 1.0068957125580165e-22],
  [690.8, 2, 9.878385051771622e-151],
  [1382, 2, 7.98937865328318e-301],
  [1.874, 2.5, 0.4999676280705349],
  [10.31, 2.5, 0.010005966870388686],
  [103.5, 2.5, 9.965079485621323e-23],
  [693.9, 2.5, 9.99050162955158e-151],
  [1385, 2.5, 1.0092801459604281e-300],
  [6.645, 7.3, 0.5000277754337746],
  [18.96, 7.3, 0.010016490476301754],
  [120.4, 7.3, 9.898969248686223e-23],
  [719.2, 7.3, 1.0204719905194727e-150],
  [1414, 7.3, 8.153848332881736e-301],
  [29.34, 30, 0.49979292512016915],
  [50.89, 30, 0.01000530865010921],
  [176.8, 30, 9.81989236471046e-23],
  [808.5, 30, 1.0102180971181065e-150],
  [1517, 30, 9.433769478218858e-301],
  [99.33, 100, 0.5001169404976746],
  [135.8, 100, 0.010010357614346738],
  [305.9, 100, 9.983701748200933e-23],
  [1012, 100, 1.0242253926372403e-150],
  [1757, 100, 9.045526142451894e-301],
  [149.3, 150, 0.5007820440349592],
  [193.2, 150, 0.010010009372949318],
  [386, 150, 1.0015226990756878e-22],
  [1134, 150, 1.1514078935814656e-150],
  [1901, 150, 1.2222496813972672e-300],
]

describe('chiSquareUpperP', () => {
  it.each(upperTail)('P(χ² ≥ %s | df %s) matches R to 1e-10 relative', (x, df, p) => {
    expect(Math.abs(chiSquareUpperP(x, df) / p - 1)).toBeLessThan(1e-10)
  })

  it('underflows only below the smallest double', () => {
    // R 4.2.2: pchisq(2100, 150, lower.tail = FALSE) = 0 (the exact value is about 1e-340).
    expect(chiSquareUpperP(2100, 150)).toBe(0)
  })

  it("refuses df above the range where stdlib's incomplete gamma is right", () => {
    // R 4.2.2: pchisq(2002, 180, lower.tail = FALSE) = 2.1399955071118948e-304; stdlib's gammainc
    // 0.3.1 answers 2.1423e-304 (1.1e-3 off), so the function must not be asked.
    expect(() => chiSquareUpperP(2002, CHI_SQUARE_MAX_DF + 30)).toThrow(/at most 150 degrees of freedom/)
  })

  it('is 1 at x ≤ 0 and NaN for impossible df', () => {
    expect(chiSquareUpperP(0, 3)).toBe(1)
    expect(chiSquareUpperP(-1, 3)).toBe(1)
    expect(chiSquareUpperP(Infinity, 3)).toBe(0)
    expect(chiSquareUpperP(1, 0)).toBeNaN()
    expect(chiSquareUpperP(Number.NaN, 3)).toBeNaN()
  })
})
