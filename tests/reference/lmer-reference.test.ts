/**
 * Live cross-check of the nested mixed-model engine against lme4 1.1-31 + lmerTest 3.1-3 (R):
 * variance components, fixed effects and their SEs, the REML criterion, condition means and all
 * pairwise contrasts with Satterthwaite df / t / p (lmerTest contest), Holm p (R p.adjust) and the
 * omnibus F (lmerTest anova, Satterthwaite). Data: the public nested data sets shipped with lme4
 * and nlme, plus seeded simulated designs. Agreement required: 1e-4 relative, or 1e-6 absolute
 * near zero. Skips, loudly, only when Rscript is not installed.
 */
import { execFileSync, spawnSync } from 'node:child_process'
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { dirname, join } from 'node:path'
import { fileURLToPath } from 'node:url'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { conditionMeans } from '../../shared/stats/condition-means'
import { fitNestedReml } from '../../shared/stats/fit-nested-reml'
import { dyestuff } from '../../shared/stats/fixtures/dyestuff'
import { dyestuff2 } from '../../shared/stats/fixtures/dyestuff2'
import { machines } from '../../shared/stats/fixtures/machines'
import { nestedColumnsFromTable } from '../../shared/stats/fixtures/nested-columns-from-table'
import { oats } from '../../shared/stats/fixtures/oats'
import { oxide } from '../../shared/stats/fixtures/oxide'
import { pastes } from '../../shared/stats/fixtures/pastes'
import { rail } from '../../shared/stats/fixtures/rail'
import { omnibusF } from '../../shared/stats/omnibus-f'
import { pairwiseContrasts } from '../../shared/stats/pairwise-contrasts'
import { prepareNestedDesign } from '../../shared/stats/prepare-nested-design'
import { studentTTwoSidedP } from '../../shared/stats/reml/student-t-two-sided-p'
import type { NestedDesign } from '../../shared/stats/types'
import { simulateNestedTable, type NestedSimulation } from './simulate-nested-table'

type Table = Record<string, readonly (string | number)[]>

interface Case {
  id: string
  table: Table
  response: string
  levels: string[]
  condition?: string
  reference?: string
  /** What the case must exercise, checked against both fits. */
  expectSingular?: boolean
  expectInserted?: boolean
}

const sim = (s: Omit<NestedSimulation, 'cells' | 'sd'> & Partial<NestedSimulation>): Table =>
  simulateNestedTable({
    cells: [2, 12],
    sd: { lab: 1, animal: 0.8, slice: 0.5, animalCondition: 0.6, residual: 1.5 },
    ...s,
  })

const cases: Case[] = [
  // Public data sets (lme4 / nlme), see the fixture files for their sources.
  { id: 'Dyestuff', table: dyestuff, response: 'Yield', levels: ['Batch'] },
  { id: 'Dyestuff2', table: dyestuff2, response: 'Yield', levels: ['Batch'], expectSingular: true },
  { id: 'Pastes', table: pastes, response: 'strength', levels: ['batch', 'cask'] },
  { id: 'Rail', table: rail, response: 'travel', levels: ['Rail'] },
  { id: 'Oxide', table: oxide, response: 'Thickness', levels: ['Lot', 'Wafer'], condition: 'Source' },
  {
    id: 'Machines',
    table: machines,
    response: 'score',
    levels: ['Worker'],
    condition: 'Machine',
    expectInserted: true,
  },
  {
    id: 'Oats',
    table: oats,
    response: 'yield',
    levels: ['Block'],
    condition: 'Variety',
    reference: 'Victory',
    expectInserted: true,
  },
  // Simulated (seeded, invented): unbalanced, with missing responses and repeating animal labels.
  {
    id: 'sim-2level-between-2cond',
    table: sim({
      seed: 'two-level',
      labs: 7,
      animals: [2, 6],
      conditions: ['vehicle', 'compound'],
      means: [20, 21.5],
      conditionAt: 'animal',
      missing: 0.03,
    }),
    response: 'length',
    levels: ['lab', 'animal'],
    condition: 'condition',
  },
  {
    id: 'sim-3level-between-3cond',
    table: sim({
      seed: 'three-level',
      labs: 6,
      animals: [3, 5],
      slices: [1, 4],
      conditions: ['vehicle', 'low', 'high'],
      means: [20, 20.7, 22],
      conditionAt: 'animal',
    }),
    response: 'length',
    levels: ['lab', 'animal', 'slice'],
    condition: 'condition',
  },
  {
    id: 'sim-within-animal-2cond',
    table: sim({
      seed: 'within',
      labs: 6,
      animals: [3, 6],
      conditions: ['vehicle', 'compound'],
      means: [20, 21],
      conditionAt: 'within',
      missing: 0.02,
    }),
    response: 'length',
    levels: ['lab', 'animal'],
    condition: 'condition',
    expectInserted: true,
  },
  {
    id: 'sim-within-animal-3cond',
    table: sim({
      seed: 'within-three',
      labs: 5,
      animals: [3, 5],
      conditions: ['vehicle', 'low', 'high'],
      means: [20, 20.4, 21.3],
      conditionAt: 'within',
    }),
    response: 'length',
    levels: ['lab', 'animal'],
    condition: 'condition',
    reference: 'low',
    expectInserted: true,
  },
  {
    id: 'sim-within-slice-3level',
    table: sim({
      seed: 'within-slice',
      labs: 4,
      animals: [2, 4],
      slices: [2, 3],
      conditions: ['vehicle', 'compound'],
      means: [20, 20.8],
      conditionAt: 'within',
    }),
    response: 'length',
    levels: ['lab', 'animal', 'slice'],
    condition: 'condition',
    expectInserted: true,
  },
  {
    id: 'sim-boundary-no-lab-variance',
    table: sim({
      seed: 'boundary-7',
      labs: 5,
      animals: [3, 5],
      sd: { lab: 0, animal: 0.8, residual: 1.5 },
      conditions: ['vehicle', 'compound'],
      means: [20, 21],
      conditionAt: 'animal',
    }),
    response: 'length',
    levels: ['lab', 'animal'],
    condition: 'condition',
    expectSingular: true,
  },
  {
    id: 'sim-condition-between-labs',
    table: sim({
      seed: 'per-lab',
      labs: 8,
      animals: [2, 5],
      conditions: ['vehicle', 'compound'],
      means: [20, 22],
      conditionAt: 'lab',
    }),
    response: 'length',
    levels: ['lab', 'animal'],
    condition: 'condition',
  },
  {
    id: 'sim-large-offset',
    table: sim({
      seed: 'offset',
      labs: 6,
      animals: [2, 5],
      sd: { lab: 0.02, animal: 0.01, residual: 0.03 },
      conditions: ['vehicle', 'compound'],
      means: [1e5, 1e5 + 0.02],
      conditionAt: 'animal',
    }),
    response: 'length',
    levels: ['lab', 'animal'],
    condition: 'condition',
  },
]

const REL_TOL = 1e-4
const ABS_TOL = 1e-6
/** Largest relative difference seen per quantity, reported after the run. */
const worst = new Map<string, { rel: number; where: string }>()

function agree(quantity: string, where: string, ours: number, theirs: number): void {
  const diff = Math.abs(ours - theirs)
  const rel = diff / Math.max(Math.abs(theirs), Math.abs(ours), 1e-300)
  const shown = diff <= ABS_TOL ? Math.min(rel, diff) : rel
  const prev = worst.get(quantity)
  if (!prev || shown > prev.rel) worst.set(quantity, { rel: shown, where })
  expect(
    diff <= ABS_TOL || rel <= REL_TOL,
    `${where} ${quantity}: ours ${ours}, lme4/lmerTest ${theirs} (relative difference ${rel.toExponential(2)})`,
  ).toBe(true)
}

const rscript = spawnSync('Rscript', ['--version'], { encoding: 'utf8' })
const hasR = !rscript.error && rscript.status === 0
if (!hasR) console.warn('lmer-reference: Rscript not found, the live lme4/lmerTest comparison is SKIPPED.')

// eslint-disable-next-line @typescript-eslint/no-explicit-any
type Reference = Record<string, any>

describe.skipIf(!hasR)('nested REML engine against lme4/lmerTest (live R)', () => {
  const dir = mkdtempSync(join(tmpdir(), 'nestwise-lmer-'))
  const designs = new Map<string, NestedDesign>()
  let reference: Reference = {}

  beforeAll(() => {
    const specs = cases.map((c) => {
      const design = prepareNestedDesign(nestedColumnsFromTable(c.table, c.response, c.levels, c.condition), {
        reference: c.reference,
      })
      designs.set(c.id, design)
      const csv = join(dir, `${c.id}.csv`)
      writeFileSync(csv, referenceCsv(c, design))
      return {
        id: c.id,
        csv,
        response: c.response,
        units: design.randomLevels.map((_, l) => `u${l + 1}`),
        condition: c.condition ?? null,
        conditionLabels: design.condition?.labels ?? null,
      }
    })
    const specPath = join(dir, 'spec.json')
    writeFileSync(specPath, JSON.stringify(specs))
    const script = join(dirname(fileURLToPath(import.meta.url)), 'lmer-reference.R')
    const out = execFileSync('Rscript', [script, specPath], {
      encoding: 'utf8',
      timeout: 120_000,
      maxBuffer: 1 << 26,
    })
    reference = JSON.parse(out)
  }, 120_000)

  afterAll(() => {
    rmSync(dir, { recursive: true, force: true })
    const lines = [...worst.entries()].map(
      ([q, w]) => `  ${q.padEnd(22)} ${w.rel.toExponential(2)}  (${w.where})`,
    )
    if (lines.length) console.log(`lmer-reference: largest differences per quantity\n${lines.join('\n')}`)
  })

  it('covers at least 8 data sets, including boundary and within-unit designs', () => {
    expect(cases.length).toBeGreaterThanOrEqual(8)
    expect(cases.some((c) => c.expectSingular && c.id.startsWith('sim'))).toBe(true)
  })

  for (const c of cases) {
    it(`agrees on ${c.id}`, () => {
      const design = designs.get(c.id)!
      const ref = reference[c.id]
      const fit = fitNestedReml(design)
      expect(fit.nObs).toBe(ref.nObs)
      expect(fit.converged).toBe(true)
      expect(fit.singular).toBe(ref.singular)
      if (c.expectSingular !== undefined) expect(fit.singular).toBe(c.expectSingular)
      if (c.expectInserted !== undefined) expect(design.randomLevels.at(-1)!.inserted).toBe(c.expectInserted)

      // Variance components: lme4 VarCorr groups u1, u2, … are our random levels in order.
      const refVar = new Map<string, number>(
        ref.components.map((x: { group: string; variance: number }) => [x.group, x.variance]),
      )
      design.randomLevels.forEach((level, l) =>
        agree('variance', `${c.id}/${level.name}`, fit.components[l].variance, refVar.get(`u${l + 1}`)!),
      )
      agree('variance', `${c.id}/residual`, fit.sigma2, refVar.get('Residual')!)
      agree('REML criterion', c.id, fit.remlCriterion, ref.remlCriterion)
      fit.beta.forEach((b, i) => agree('fixed effect', `${c.id}/${fit.betaNames[i]}`, b, ref.beta[i]))
      fit.vcovBeta.forEach((row, i) =>
        agree('fixed-effect SE', `${c.id}/${fit.betaNames[i]}`, Math.sqrt(row[i]), ref.se[i]),
      )

      conditionMeans(design, fit).forEach((m, j) => {
        const r = ref.means[j]
        const where = `${c.id}/mean ${m.condition ?? 'all'}`
        agree('mean', where, m.mean, r.estimate)
        agree('mean SE', where, m.se, r.se)
        agree('Satterthwaite df', where, m.df, r.df)
        // Means carry intervals, not p: test mean = 0 from the same t and df as lmerTest does.
        agree('p-value', where, studentTTwoSidedP(m.mean / m.se, m.df), r.p)
      })

      const pairs = pairwiseContrasts(design, fit)
      expect(pairs.length).toBe(ref.pairwise?.length ?? 0)
      pairs.forEach((pc, i) => {
        const r = ref.pairwise[i]
        const where = `${c.id}/${pc.a}-${pc.b}`
        expect(`${pc.a}-${pc.b}`).toBe(`${r.a}-${r.b}`)
        agree('contrast', where, pc.estimate, r.estimate)
        agree('contrast SE', where, pc.se, r.se)
        agree('Satterthwaite df', where, pc.df, r.df)
        agree('t', where, pc.t, r.t)
        agree('p-value', where, pc.p, r.p)
        agree('Holm p-value', where, pc.pHolm, r.pHolm)
      })

      const f = omnibusF(design, fit)
      if (f) {
        agree('F', c.id, f.f, ref.anova.f)
        expect(f.df1).toBe(ref.anova.df1)
        agree('F denominator df', c.id, f.df2, ref.anova.df2)
        agree('F p-value', c.id, f.p, ref.anova.p)
      }
    })
  }
})

/** The CSV for R: response, condition and one path-keyed unit id column per random level. */
function referenceCsv(c: Case, design: NestedDesign): string {
  const n = c.table[c.response].length
  const header = [
    c.response,
    ...(c.condition ? [c.condition] : []),
    ...design.randomLevels.map((_, l) => `u${l + 1}`),
  ]
  const rows = [header.join(',')]
  for (let r = 0; r < n; r++) {
    const y = Number(c.table[c.response][r])
    const path: string[] = []
    const ids = design.randomLevels.map((level) => {
      path.push(String(level.inserted ? c.table[c.condition!][r] : c.table[level.name][r]))
      return quote(path.join('/'))
    })
    rows.push(
      [
        Number.isNaN(y) ? 'NA' : String(y),
        ...(c.condition ? [quote(String(c.table[c.condition][r]))] : []),
        ...ids,
      ].join(','),
    )
  }
  return rows.join('\n') + '\n'
}

function quote(s: string): string {
  return `"${s.replace(/"/g, '""')}"`
}
