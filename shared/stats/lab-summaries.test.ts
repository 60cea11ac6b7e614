import { describe, expect, it } from 'vitest'
import { checkLabSummaries } from './lab-summaries'

describe('checkLabSummaries', () => {
  it('passes good summaries through', () => {
    const labs = [
      { n: 2, mean: 1, sd: 0.1 },
      { n: 1, mean: 2, sd: 0 },
    ]
    expect(checkLabSummaries(labs, 2, 'x')).toBe(labs)
  })

  it('names the caller and the laboratory in its errors', () => {
    expect(() => checkLabSummaries([{ n: 2, mean: 1, sd: 1 }], 2, 'labPrecision')).toThrow(
      /labPrecision requires at least 2 laboratories, got 1/,
    )
    expect(() => checkLabSummaries(null as never, 2, 'x')).toThrow(/got 0/)
    expect(() =>
      checkLabSummaries(
        [
          { n: 2, mean: 1, sd: 1 },
          { n: 0, mean: 1, sd: 1 },
        ],
        2,
        'x',
      ),
    ).toThrow(/laboratory 2 needs a whole number of results/)
    expect(() =>
      checkLabSummaries(
        [
          { n: 2, mean: 1, sd: 1 },
          { n: 1.5, mean: 1, sd: 1 },
        ],
        2,
        'x',
      ),
    ).toThrow(/laboratory 2/)
    expect(() =>
      checkLabSummaries(
        [
          { n: 2, mean: Number.NaN, sd: 1 },
          { n: 2, mean: 1, sd: 1 },
        ],
        2,
        'x',
      ),
    ).toThrow(/mean of laboratory 1/)
    expect(() =>
      checkLabSummaries(
        [
          { n: 2, mean: 1, sd: -1 },
          { n: 2, mean: 1, sd: 1 },
        ],
        2,
        'x',
      ),
    ).toThrow(/SD of laboratory 1 must be a non-negative number/)
  })
})
