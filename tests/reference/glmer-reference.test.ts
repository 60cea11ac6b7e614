/**
 * Live cross-check of the binary and count models (nested GLMMs by the Laplace approximation)
 * against lme4 1.1-31's glmer (R): the engine's own formula is refitted in R with tight optimiser
 * tolerances, and variance components, fixed effects, their SEs (glmer's Hessian-based vcov), and
 * the Wald z tests of coefficients, cell means and pairwise contrasts are compared. Data: MASS
 * `bacteria` (binary), lme4 `grouseticks` (counts), and seeded invented tables (binary with a lab
 * × condition variance, successes out of trials with a covariate, counts with two factors).
 * Agreement required: 1e-3 relative on estimates, SEs and p-values, 5e-3 on variance components
 * (relative to the largest), 1e-6 absolute near zero. Also: the same fixed effects without random
 * terms are R's glm. Skips, loudly, only when Rscript is not installed.
 */
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import seedrandom from 'seedrandom'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { fitNestedGlmm } from '../../shared/stats/fit-nested-glmm'
import { glmFit } from '../../shared/stats/glmm/glm-fit'
import { bacteria } from '../../shared/stats/fixtures/bacteria'
import { grouseticks } from '../../shared/stats/fixtures/grouseticks'
import { nestedColumnsFromTable } from '../../shared/stats/fixtures/nested-columns-from-table'
import { modelFormula } from '../../shared/stats/model-formula'
import { prepareNestedDesign } from '../../shared/stats/prepare-nested-design'
import type { NestedDesign } from '../../shared/stats/types'
import { waldTest } from '../../shared/stats/wald-test'
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
  trials?: string
  levels: string[]
  conditions?: string[]
  covariates?: string[]
  reference?: Record<string, string>
  expectTerms?: string[]
}

const ESTIMATE_TOL = 1e-3
const VARIANCE_TOL = 5e-3
const ABS_TOL = 1e-6

/** Invented, seeded: labs > animals > cells; a yes/no, successes-of-trials or count response. */
function simulate(spec: {
  seed: string
  labs: number
  animals: number
  cells: [number, number]
  sd: { lab: number; labCondition: number; animal: number }
  kind: 'binary' | 'trials' | 'counts'
  twoFactors?: boolean
}): Table {
  const rng = seedrandom(spec.seed)
  const normal = () => Math.sqrt(-2 * Math.log(1 - rng())) * Math.cos(2 * Math.PI * rng())
  const t: Record<string, (string | number)[]> = {
    lab: [],
    animal: [],
    treatment: [],
    genotype: [],
    soma: [],
    y: [],
    n: [],
  }
  for (let l = 0; l < spec.labs; l++) {
    const labEffect = spec.sd.lab * normal()
    const arm = [spec.sd.labCondition * normal(), spec.sd.labCondition * normal()]
    for (let a = 0; a < spec.animals; a++) {
      const treated = (a + l) % 2
      const genotype = Math.floor(a / 2) % 2
      const animalEffect = spec.sd.animal * normal()
      const cells = spec.cells[0] + Math.floor(rng() * (spec.cells[1] - spec.cells[0] + 1))
      for (let c = 0; c < cells; c++) {
        const soma = Math.round((100 + 15 * normal()) * 10) / 10
        const eta =
          (spec.kind === 'counts' ? 1.2 : -0.4) +
          0.6 * treated +
          (spec.twoFactors ? -0.5 * genotype + 0.4 * treated * genotype : 0) +
          (spec.kind === 'trials' ? 0.01 * (soma - 100) : 0) +
          labEffect +
          arm[treated] +
          animalEffect
        const p = 1 / (1 + Math.exp(-eta))
        let y = 0
        let n = 1
        if (spec.kind === 'binary') y = rng() < p ? 1 : 0
        else if (spec.kind === 'trials') {
          n = 5 + Math.floor(rng() * 20)
          for (let k = 0; k < n; k++) if (rng() < p) y++
        } else {
          // Poisson by inversion.
          const lambda = Math.exp(eta)
          let cdf = Math.exp(-lambda)
          let term = cdf
          const u = rng()
          while (u > cdf && y < 1000) {
            y++
            term *= lambda / y
            cdf += term
          }
        }
        t.lab.push(`lab-${l + 1}`)
        t.animal.push(`m${a + 1}`)
        t.treatment.push(treated ? 'KX-9' : 'vehicle')
        t.genotype.push(genotype ? 'KO' : 'WT')
        t.soma.push(soma)
        t.y.push(y)
        t.n.push(n)
      }
    }
  }
  return t
}

const cases: Case[] = [
  // Public data sets, see the fixture files for their sources.
  {
    id: 'bacteria',
    table: bacteria,
    family: 'binomial',
    response: 'y',
    levels: ['ID'],
    conditions: ['trt'],
    reference: { trt: 'placebo' },
  },
  {
    id: 'grouseticks',
    table: grouseticks,
    family: 'poisson',
    response: 'TICKS',
    levels: ['LOCATION', 'BROOD', 'INDEX'],
    conditions: ['YEAR'],
    expectTerms: ['LOCATION', 'LOCATION:YEAR', 'BROOD', 'INDEX'],
  },
  // Invented, seeded.
  {
    id: 'sim-binary-lab-condition',
    table: simulate({
      seed: 'glmm-binary',
      labs: 8,
      animals: 8,
      cells: [15, 40],
      sd: { lab: 0.6, labCondition: 0.5, animal: 0.5 },
      kind: 'binary',
    }),
    family: 'binomial',
    response: 'y',
    levels: ['lab', 'animal'],
    conditions: ['treatment'],
    reference: { treatment: 'vehicle' },
    expectTerms: ['lab', 'lab:treatment', 'animal'],
  },
  {
    id: 'sim-trials-covariate',
    table: simulate({
      seed: 'glmm-trials',
      labs: 6,
      animals: 6,
      cells: [3, 6],
      sd: { lab: 0.5, labCondition: 0.3, animal: 0.4 },
      kind: 'trials',
    }),
    family: 'binomial',
    response: 'y',
    trials: 'n',
    levels: ['lab', 'animal'],
    conditions: ['treatment'],
    covariates: ['soma'],
    reference: { treatment: 'vehicle' },
  },
  {
    id: 'sim-counts-two-factors',
    table: simulate({
      seed: 'glmm-counts',
      labs: 6,
      animals: 8,
      cells: [5, 15],
      sd: { lab: 0.4, labCondition: 0.3, animal: 0.3 },
      kind: 'counts',
      twoFactors: true,
    }),
    family: 'poisson',
    response: 'y',
    levels: ['lab', 'animal'],
    conditions: ['genotype', 'treatment'],
    reference: { genotype: 'WT', treatment: 'vehicle' },
  },
]

const worst = new WorstDifferences(ABS_TOL)
function agree(
  quantity: string,
  where: string,
  ours: number,
  theirs: number,
  tolerance: number,
  scale = Math.abs(theirs),
): void {
  const diff = Math.abs(ours - theirs)
  const rel = diff / Math.max(scale, 1e-300)
  worst.note(quantity, where, rel, diff)
  expect(
    diff <= ABS_TOL || rel <= tolerance,
    `${where} ${quantity}: ours ${ours}, glmer ${theirs} (relative ${rel.toExponential(2)})`,
  ).toBe(true)
}

const hasR = rscriptAvailable('glmer-reference', 'the live glmer comparison')

// eslint-disable-next-line @typescript-eslint/no-explicit-any
type Reference = Record<string, any>

describe.skipIf(!hasR)('nested GLMM engine against lme4 glmer (live R)', () => {
  const dir = mkdtempSync(join(tmpdir(), 'nestwise-glmer-'))
  const designs = new Map<string, NestedDesign>()
  let reference: Reference = {}

  beforeAll(() => {
    const specs = cases.map((c) => {
      const columns = nestedColumnsFromTable(c.table, c.response, c.levels, c.conditions, c.covariates)
      const design = prepareNestedDesign(columns, { reference: c.reference, observationLevelUnits: true })
      designs.set(c.id, design)
      const csv = join(dir, `${c.id}.csv`)
      writeFileSync(csv, referenceCsv(c.table, caseColumns(c)))
      return {
        id: c.id,
        csv,
        formula: modelFormula(design, c.trials),
        family: c.family,
        factors: design.factors.map((f) => ({ name: f.name, labels: f.labels })),
        numeric: [c.response, ...(c.trials ? [c.trials] : []), ...(c.covariates ?? [])],
        contrasts: contrastRows(design),
      }
    })
    reference = referenceFromSpecs('glmer-reference.R', dir, specs, 240_000)
  }, 240_000)

  afterAll(() => {
    rmSync(dir, { recursive: true, force: true })
    worst.report('glmer-reference: largest differences per quantity', 18)
  })

  for (const c of cases) {
    it(`agrees on ${c.id}`, () => {
      const design = designs.get(c.id)!
      const ref = reference[c.id]
      const trials = c.trials ? Float64Array.from(c.table[c.trials].map(Number)) : null
      const fit = fitNestedGlmm(design, { family: c.family, trials })
      expect(fit.converged).toBe(true)
      if (c.expectTerms) expect(design.terms.map((t) => t.name)).toEqual(c.expectTerms)
      const refVar = new Map<string, number>(
        ref.components.map((x: { group: string; variance: number }) => [x.group, x.variance]),
      )
      const largest = Math.max(...fit.components.map((x) => x.variance), ...refVar.values())
      design.terms.forEach((term, t) =>
        agree(
          'variance',
          `${c.id}/${term.name}`,
          fit.components[t].variance,
          refVar.get(term.grouping.join(':'))!,
          VARIANCE_TOL,
          largest,
        ),
      )
      fit.beta.forEach((b, i) => agree('fixed effect', `${c.id}/β${i}`, b, ref.beta[i], ESTIMATE_TOL))
      fit.vcovBeta.forEach((row, i) =>
        agree('SE', `${c.id}/β${i}`, Math.sqrt(row[i]), ref.se[i], ESTIMATE_TOL),
      )
      // Without its random terms the model is R's glm.
      const plain = glmFit(fit.rows, design.terms.length)
      plain.beta.forEach((b, i) => agree('GLM estimate', `${c.id}/β${i}`, b, ref.glm.beta[i], ESTIMATE_TOL))
      plain.vcov.forEach((row, i) =>
        agree('GLM SE', `${c.id}/β${i}`, Math.sqrt(row[i]), ref.glm.se[i], ESTIMATE_TOL),
      )
      contrastRows(design).forEach((l, i) => {
        const ours = waldTest(fit.beta, fit.vcovBeta, l)
        const theirs = ref.contrasts[i]
        agree('estimate', `${c.id}/L${i}`, ours.estimate, theirs.estimate, ESTIMATE_TOL)
        agree('SE', `${c.id}/L${i}`, ours.se, theirs.se, ESTIMATE_TOL)
        agree('p-value', `${c.id}/L${i}`, ours.p, theirs.p, ESTIMATE_TOL)
      })
    })
  }
})

/** Coefficients, cell means (link scale), then every pair of cells. */
function contrastRows(design: NestedDesign): number[][] {
  const { unit, means, pairs } = cellContrastRows(design)
  return [...unit, ...means, ...pairs]
}

/** The case's own columns, as the file a user would refit the formula on. */
function caseColumns(c: Case): string[] {
  return [
    c.response,
    ...(c.trials ? [c.trials] : []),
    ...(c.conditions ?? []),
    ...(c.covariates ?? []),
    ...c.levels,
  ]
}
