/**
 * Live cross-check of boundary fits of the binary and count models, through the engine's public
 * entry (analyzeNested with a family, as an analysis run calls it), against R's glm() and lme4
 * 1.1-31's glmer (see glmm-boundary-reference.R):
 *
 * 1. One unit per observation reduces the model to an ordinary GLM. The engine does not drop such
 *    a level: a lone level is always a random term, and in a binary or count model a level of
 *    single observations is kept on purpose as an observation-level term (only a level × condition
 *    term whose groups are the observations is skipped, see maximalRandomTerms). The reduction is
 *    therefore the fit's: with one 0/1 row per mouse that term is not identified (its Laplace
 *    deviance rises only as σ⁴ from 0), and with counts that vary less than a Poisson count it has
 *    nothing to take up, so its variance is estimated at exactly 0 and the fixed effects, their SEs,
 *    z and p are glm()'s on the same rows (1e-6 relative).
 * 2. Invented data with no lab effect at all: the lab variance is estimated at 0, the result warns
 *    BOUNDARY_FIT, and glmer on the same rows reports isSingular TRUE with the same estimates (1e-3
 *    relative, the agreement of glmer-reference.test.ts; 1e-6 absolute near 0).
 *
 * Data: invented, seeded (shared/analysis/fixtures/invented-glmm-tables.ts). Skips, loudly, only
 * when Rscript is not installed.
 */
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { analyzeNested } from '../../shared/analysis/analyze-nested'
import { noLabEffectTable, oneRowPerMouseTable } from '../../shared/analysis/fixtures/invented-glmm-tables'
import type { AnalysisResult, WaldContrast } from '../../shared/schemas/analysis-result'
import { nestedColumnsFromTable } from '../../shared/stats/fixtures/nested-columns-from-table'
import { prepareNestedDesign } from '../../shared/stats/prepare-nested-design'
import type { NestedColumns, NestedDesign } from '../../shared/stats/types'
import {
  cellContrastRows,
  referenceCsv,
  referenceFromSpecs,
  rscriptAvailable,
  WorstDifferences,
} from './r-reference'

type Table = Record<string, readonly (string | number)[]>

interface Case {
  id: string
  table: Table
  family: 'binomial' | 'poisson'
  response: string
  levels: string[]
  glmer: boolean
}

const GLM_TOL = 1e-6
const GLMER_TOL = 1e-3
const ABS_TOL = 1e-6
const REFERENCE = { treatment: 'vehicle' }

const perMouse = oneRowPerMouseTable(120)
const cases: Case[] = [
  {
    id: 'one-row-per-mouse-binary',
    table: perMouse,
    family: 'binomial',
    response: 'marker01',
    levels: ['mouse'],
    glmer: false,
  },
  {
    id: 'one-row-per-mouse-counts',
    table: perMouse,
    family: 'poisson',
    response: 'puncta',
    levels: ['mouse'],
    glmer: false,
  },
  {
    id: 'no-lab-effect',
    table: noLabEffectTable(),
    family: 'binomial',
    response: 'marker01',
    levels: ['lab', 'mouse'],
    glmer: true,
  },
]

const worst = new WorstDifferences(ABS_TOL)
function agree(quantity: string, where: string, ours: number, theirs: number, tolerance: number): void {
  const diff = Math.abs(ours - theirs)
  const rel = diff / Math.max(Math.abs(theirs), 1e-300)
  worst.note(quantity, where, rel, diff)
  expect(
    (tolerance > GLM_TOL && diff <= ABS_TOL) || rel <= tolerance,
    `${where} ${quantity}: ours ${ours}, R ${theirs} (relative ${rel.toExponential(2)})`,
  ).toBe(true)
}

const hasR = rscriptAvailable('glmm-boundary-reference', 'the live glm/glmer comparison')

// eslint-disable-next-line @typescript-eslint/no-explicit-any
type Reference = Record<string, any>

describe.skipIf(!hasR)('boundary fits of the binary and count models against R (live glm and glmer)', () => {
  const dir = mkdtempSync(join(tmpdir(), 'nestwise-glmm-boundary-'))
  const results = new Map<string, { result: AnalysisResult; design: NestedDesign }>()
  let reference: Reference = {}

  beforeAll(() => {
    const specs = cases.map((c) => {
      const columns: NestedColumns = {
        ...nestedColumnsFromTable(c.table, c.response, c.levels, 'treatment'),
        family: c.family,
      }
      const result = analyzeNested(columns, { reference: REFERENCE })
      // The design the analysis fitted (analyzeNestedGlmm prepares it with these options).
      const design = prepareNestedDesign(columns, { reference: REFERENCE, observationLevelUnits: true })
      results.set(c.id, { result, design })
      const csv = join(dir, `${c.id}.csv`)
      writeFileSync(csv, referenceCsv(c.table, [c.response, 'treatment', ...c.levels]))
      return {
        id: c.id,
        csv,
        formula: result.model!.formula,
        family: c.family,
        factors: design.factors.map((f) => ({ name: f.name, labels: f.labels })),
        numeric: [c.response],
        glmer: c.glmer,
        contrasts: contrastRows(design),
      }
    })
    reference = referenceFromSpecs('glmm-boundary-reference.R', dir, specs, 120_000)
  }, 120_000)

  afterAll(() => {
    rmSync(dir, { recursive: true, force: true })
    worst.report('glmm-boundary-reference: largest differences per quantity', 22)
  })

  /** Coefficients, then every pair of cells, in the order the result lists them. */
  function compareWald(c: Case, fit: 'glm' | 'glmer', tolerance: number): void {
    const { result } = results.get(c.id)!
    const mixed = result.comparisons.mixedModel!
    const ref = reference[c.id][fit]
    const ours = [
      ...mixed.coefficients!.map((x) => x as { estimate: number; se: number; z: number; p: number }),
      ...mixed.contrasts.map((x) => x as WaldContrast),
    ]
    expect(ours).toHaveLength(ref.contrasts.length)
    ours.forEach((w, i) => {
      const theirs = ref.contrasts[i]
      const where = `${c.id}/L${i}`
      agree(`${fit} estimate`, where, w.estimate, theirs.estimate, tolerance)
      agree(`${fit} SE`, where, w.se, theirs.se, tolerance)
      agree(`${fit} z`, where, w.z, theirs.z, tolerance)
      agree(`${fit} p-value`, where, w.p, theirs.p, tolerance)
    })
  }

  for (const c of cases.filter((x) => !x.glmer)) {
    it(`one unit per observation is R's glm: ${c.id}`, () => {
      const { result, design } = results.get(c.id)!
      // The mouse term stays in the model (an observation-level term) …
      expect(result.model!.formula).toBe(`${c.response} ~ treatment + (1|mouse)`)
      expect(design.randomLevels[0].nUnits).toBe(design.nObs)
      expect(result.converged).toBe(true)
      // … and is estimated at exactly 0, so the model is the GLM (R 4.x glm(), live).
      expect(result.varianceComponents[0]).toMatchObject({ level: 'mouse', variance: 0 })
      expect(result.singular).toBe(true)
      expect(result.warnings.map((w) => w.code)).toContain('BOUNDARY_FIT')
      compareWald(c, 'glm', GLM_TOL)
    })
  }

  it('no lab effect: the lab variance is 0, the result warns, and glmer agrees and is singular', () => {
    const c = cases.find((x) => x.glmer)!
    const { result, design } = results.get(c.id)!
    const ref = reference[c.id].glmer
    expect(result.converged).toBe(true)
    expect(result.singular).toBe(true)
    expect(ref.singular).toBe(true) // lme4 glmer isSingular(), live
    const lab = result.varianceComponents.find((v) => v.level === 'lab')!
    expect(lab.variance).toBe(0)
    const boundary = result.warnings.find((w) => w.code === 'BOUNDARY_FIT')
    expect(boundary?.message).toMatch(/"lab"|“lab”|lab/)
    // Variance components against lme4 glmer, live (relative to the largest, as glmer-reference).
    const refVar = new Map<string, number>(
      ref.components.map((x: { group: string; variance: number }) => [x.group, x.variance]),
    )
    const largest = Math.max(
      ...result.varianceComponents.slice(0, -1).map((v) => v.variance),
      ...refVar.values(),
    )
    design.terms.forEach((term, t) => {
      const theirs = refVar.get(term.grouping.join(':'))!
      const ours = result.varianceComponents[t].variance
      const rel = Math.abs(ours - theirs) / largest
      worst.note('glmer variance', `${c.id}/${term.name}`, rel)
      expect(rel, `${term.name}: ours ${ours}, glmer ${theirs}`).toBeLessThanOrEqual(5e-3)
    })
    expect(refVar.get('lab')).toBeLessThan(1e-8) // lme4 glmer, live: at the boundary too
    // Fixed effects, SEs, z and p of coefficients and contrasts against lme4 glmer, live.
    compareWald(c, 'glmer', GLMER_TOL)
  })
})

/** Coefficients (unit rows), then every pair of cells (later minus earlier), as the result lists them. */
function contrastRows(design: NestedDesign): number[][] {
  const { unit, pairs } = cellContrastRows(design)
  return [...unit, ...pairs]
}
