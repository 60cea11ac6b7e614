/**
 * Live cross-check of the engine's distribution functions against R (pt, pf, pchisq, pnorm, qt) over
 * a grid of statistics and degrees of freedom: df from 1 to 1e8 (t also 1e12, 1e13, 1e15), p from
 * about one half down to 1e-300. All requests go to R in one Rscript call. Agreement required: 1e-10
 * relative, except the F tail at large df2, where stdlib's incomplete beta loses about df2 · 2e-17
 * (see fUpperP), and only where R itself is exact to that level: R's pf, pchisq, pnorm are; its pt
 * above df 4e5 is a normal approximation good to 2e-13 here; its qt is checked for p ≥ 1e-100
 * (qt(1e-300, 2.5) is 9e-6 off). F tails with df1 ≥ 10 are checked down to p = 1e-250, below which
 * stdlib's incomplete beta underflows. Skips, loudly, only when Rscript is not installed.
 */
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { chiSquareUpperP } from '../../shared/stats/chi-square-upper-p'
import { normalUpperP } from '../../shared/stats/normal-upper-p'
import { fUpperP } from '../../shared/stats/reml/f-upper-p'
import { studentTQuantile } from '../../shared/stats/student-t-quantile'
import { studentTUpperP } from '../../shared/stats/student-t-upper-p'
import { rscriptAvailable, runRScript } from './r-reference'

type Kind = 't_upper' | 'f_upper' | 'chisq_upper' | 'normal_upper' | 't_quantile'
interface Request {
  kind: Kind
  x: number
  df1: number
  df2: number
}

const T_DF = [1, 2.5, 7.3, 30, 1e3, 4e5, 1e6, 1717993, 1e7, 1e8, 1e12]
const T_STATISTICS = [
  -3, -0.01, 0.01, 0.5, 1, 2, 3, 5, 10, 20, 30, 37, 100, 1e3, 1e5, 1e10, 1e20, 1e50, 1e100, 1e150, 1e200,
]
const F_DF1 = [1, 2, 3.5, 10, 40]
const F_DF2 = [1, 2.5, 7.3, 30, 1e3, 4e5, 1e6, 1e7, 1e8]
const F_STATISTICS = [0.1, 0.5, 1, 2, 4, 10, 30, 100, 1e3, 1e4, 1e6, 1e10, 1e20, 1e50, 1e100, 1e150, 1e200]
const CHISQ_DF = [1, 2, 2.5, 7.3, 30, 100, 150]
const CHISQ_STATISTICS = [0.01, 0.5, 1, 3, 10, 30, 100, 300, 600, 1000, 1300]
const Z_STATISTICS = [-5, -1, 0, 0.5, 1, 2, 3, 5, 8, 10, 15, 20, 25, 30, 35, 37]
const QT_DF = [1, 2.5, 7.3, 30, 1e3, 4e5, 1e6, 1717993, 1e7, 1e8, 1e13, 1e15]
const QT_P = [0.975, 0.6, 0.025, 1e-5, 4.7e-22, 1e-50, 1e-100]

const requests: Request[] = [
  ...T_DF.flatMap((df) => T_STATISTICS.map((x) => ({ kind: 't_upper' as const, x, df1: df, df2: 0 }))),
  ...F_DF1.flatMap((df1) =>
    F_DF2.flatMap((df2) => F_STATISTICS.map((x) => ({ kind: 'f_upper' as const, x, df1, df2 }))),
  ),
  ...CHISQ_DF.flatMap((df) =>
    CHISQ_STATISTICS.map((x) => ({ kind: 'chisq_upper' as const, x, df1: df, df2: 0 })),
  ),
  ...Z_STATISTICS.map((x) => ({ kind: 'normal_upper' as const, x, df1: 0, df2: 0 })),
  ...QT_DF.flatMap((df) => QT_P.map((x) => ({ kind: 't_quantile' as const, x, df1: df, df2: 0 }))),
]

function ours(r: Request): number {
  switch (r.kind) {
    case 't_upper':
      return studentTUpperP(r.x, r.df1)
    case 'f_upper':
      return fUpperP(r.x, r.df1, r.df2)
    case 'chisq_upper':
      return chiSquareUpperP(r.x, r.df1)
    case 'normal_upper':
      return normalUpperP(r.x)
    case 't_quantile':
      return studentTQuantile(r.x, r.df1)
  }
}

/** Which rows R answers exactly enough to check, and how closely. */
function tolerance(r: Request, reference: number): number | null {
  const isTail = r.kind !== 't_quantile'
  // Below 1e-300 the doubles thin out into subnormals; R's pnorm and pchisq return 0 there.
  if (isTail && !(reference >= 1e-300)) return null
  if (r.kind === 'f_upper') {
    if (r.df1 >= 10 && reference < 1e-250) return null
    return Math.max(1e-10, 5e-17 * r.df2)
  }
  return 1e-10
}

const hasR = rscriptAvailable('distributions-reference', 'the live comparison with R')

describe.skipIf(!hasR)('t, F, χ² and normal distributions against R (live)', () => {
  const dir = mkdtempSync(join(tmpdir(), 'nestwise-distributions-'))
  let reference: number[] = []
  const worst = new Map<Kind, { rel: number; where: string }>()

  beforeAll(() => {
    const csv = join(dir, 'requests.csv')
    // 17 significant digits carry every double exactly into R.
    const cell = (v: number) => (Number.isFinite(v) ? v.toPrecision(17) : v > 0 ? 'Inf' : '-Inf')
    writeFileSync(
      csv,
      requests.map((r) => [r.kind, cell(r.x), cell(r.df1), cell(r.df2)].join(',')).join('\n'),
    )
    const out = runRScript('distributions-reference.R', [csv], 60_000)
    reference = out.trim().split('\n').map(Number)
  }, 60_000)

  afterAll(() => {
    rmSync(dir, { recursive: true, force: true })
    const lines = [...worst.entries()].map(
      ([k, w]) => `  ${k.padEnd(13)} ${w.rel.toExponential(2)}  (${w.where})`,
    )
    if (lines.length)
      console.log(`distributions-reference: largest relative differences\n${lines.join('\n')}`)
  })

  it('answers every request and checks the tails down to 1e-250 and below', () => {
    expect(reference).toHaveLength(requests.length)
    const checked = requests.filter((r, i) => tolerance(r, reference[i]) !== null)
    expect(checked.length).toBeGreaterThan(requests.length / 2)
    for (const kind of ['t_upper', 'f_upper', 'chisq_upper', 'normal_upper'] as const) {
      const smallest = Math.min(
        ...requests.map((r, i) =>
          r.kind === kind && tolerance(r, reference[i]) !== null ? reference[i] : 1,
        ),
      )
      expect(smallest, kind).toBeLessThan(1e-250)
    }
  })

  for (const kind of ['t_upper', 'f_upper', 'chisq_upper', 'normal_upper', 't_quantile'] as const) {
    it(`agrees on ${kind}`, () => {
      requests.forEach((r, i) => {
        if (r.kind !== kind) return
        const theirs = reference[i]
        const allowed = tolerance(r, theirs)
        if (allowed === null) return
        const value = ours(r)
        const rel = value === theirs ? 0 : Math.abs(value / theirs - 1)
        const where = `x ${r.x}, df ${r.df1}${r.kind === 'f_upper' ? `, ${r.df2}` : ''}`
        if (rel >= (worst.get(kind)?.rel ?? 0)) worst.set(kind, { rel, where })
        expect(rel, `${kind} at ${where}: ours ${value}, R ${theirs}`).toBeLessThan(allowed)
      })
    })
  }
})
