import type { AnalysisResult, GroupSummary, WaldContrast } from '../schemas/analysis-result'
import { cellMeanRow } from '../stats/cell-mean-row'
import { ENGINE_VERSION } from '../stats/engine-version'
import { fitNestedGlmm, type NestedGlmmFit } from '../stats/fit-nested-glmm'
import { FAMILIES } from '../stats/glmm/family'
import { glmFit } from '../stats/glmm/glm-fit'
import { holmAdjust } from '../stats/holm-adjust'
import { latentResidualVariance } from '../stats/latent-residual-variance'
import { modelFormula } from '../stats/model-formula'
import { prepareNestedDesign } from '../stats/prepare-nested-design'
import { quadraticForm } from '../stats/reml/quadratic-form'
import { nestedSufficientStats } from '../stats/reml/sufficient-stats'
import { typeThreeHypotheses } from '../stats/type-three-hypotheses'
import type { NestedColumns, NestedDesign } from '../stats/types'
import { waldChiSquare } from '../stats/wald-chi-square'
import { waldTest } from '../stats/wald-test'
import type { AnalyzeNestedOptions } from './analyze-options'
import { bootstrapIfAsked } from './bootstrap-for-result'
import { buildWarnings } from './build-warnings'
import { checkGlmmResponse } from './check-glmm-response'
import { compareUnitMeans } from './compare-unit-means'
import { describeDesign, designWarningFacts, headlineQuantity, unitsPerCell } from './describe-design'
import { glmmNaiveComparison } from './glmm-naive-comparison'
import { effectVariation, tableDesignEffects, termIccs } from './term-summaries'

const CONFIDENCE = 0.95

/**
 * The analysis of a binary (yes/no, or successes out of trials) or count response: the nested
 * GLMM of the same maximal random part as the normal model (see fitNestedGlmm, the Laplace
 * approximation as glmer), Wald z tests of its coefficients, Wald χ² tests of its terms, every
 * pair of design cells as an odds or rate ratio with its 95 % interval (Holm-adjusted p), cell
 * proportions or rates for a typical unit (random effects at 0) beside the plain ones, variance
 * shares and ICC on the latent scale (Nakagawa, Johnson & Schielzeth 2017), design effects as
 * variance ratios against the same model without units, the unit-means check on unit
 * proportions or rates, the naive test (χ² or a GLM without units) and, for counts, a check for
 * overdispersion.
 *
 * Guard errors (EngineInputError): a response the family cannot take (naming the row), and those
 * of prepareNestedDesign and fitNestedGlmm.
 *
 * @example
 * analyzeNestedGlmm({ ...columns, family: 'binomial' })
 * // → { family: 'binomial', comparisons: { mixedModel: { contrasts: [{ a: 'drug', b: 'placebo', ratio: 0.30, … }] } }, … }
 */
export function analyzeNestedGlmm(
  columns: NestedColumns,
  options: AnalyzeNestedOptions = {},
): AnalysisResult {
  const family = columns.family === 'poisson' ? 'poisson' : 'binomial'
  checkGlmmResponse(columns)
  const trialsIn = family === 'binomial' ? (columns.trials ?? null) : null
  // A row without trials cannot count: leave it out with the rows whose response is missing.
  const response = trialsIn
    ? columns.response.map((y, r) => (Number.isNaN(trialsIn[r]) ? NaN : y))
    : columns.response
  const design = prepareNestedDesign(
    { ...columns, response },
    { ...(options.reference ? { reference: options.reference } : {}), observationLevelUnits: true },
  )
  const trials = trialsIn ? keptRows(trialsIn, design) : null
  const fit = fitNestedGlmm(design, { family, trials })
  const naiveFit = glmFit(fit.rows, design.terms.length)

  const randomTotal = fit.components.reduce((s, c) => s + c.variance, 0)
  const residual = latentResidualVariance(fit.link, meanLinearPredictor(design, fit), randomTotal)
  const total = randomTotal + residual
  const shares = [...fit.components.map((c) => c.variance / total), residual / total]
  const designEffectOf = (l: number[]) => quadraticForm(l, fit.vcovBeta) / quadraticForm(l, naiveFit.vcov)

  const counts = cellTotals(design, trials)
  const groups = cellSummaries(design, fit, naiveFit, counts)
  const contrasts = pairwise(design, fit, designEffectOf)
  const headline = headlineQuantity(design, contrasts, designEffectOf)
  const hypotheses = hypothesesOf(design)
  const firstPair = contrasts.length > 0 ? { a: contrasts[0].a, b: contrasts[0].b } : null
  const unitMeans = compareUnitMeans(design, firstPair, trials)
  const naive = glmmNaiveComparison(design, family, counts, naiveFit, hypotheses)
  const overdispersion = family === 'poisson' ? pearsonRatio(design, fit) : null
  // Successes out of trials have no single observations to resample.
  const bootstrap = trials ? null : bootstrapIfAsked(design, contrasts, options, CONFIDENCE)

  const { random, ...described } = describeDesign(design)
  const variation = effectVariation(
    design,
    fit.components.map((c) => c.variance),
  )
  const result: AnalysisResult = {
    ...described,
    family,
    model: {
      formula: modelFormula(design, trialsIn ? columns.trialsName : undefined),
      family: family === 'binomial' ? 'binomial(link = "logit")' : 'poisson(link = "log")',
      random,
      skipped: design.skippedTerms,
    },
    varianceComponents: [
      ...fit.components.map((c, t) => ({ level: c.level, variance: c.variance, share: shares[t] })),
      { level: 'residual', variance: residual, share: shares[shares.length - 1] },
    ],
    effectVariation: variation,
    icc: termIccs(design, shares.slice(0, -1), null),
    singular: fit.singular,
    converged: fit.converged,
    remlCriterion: null,
    designEffect: headline.designEffect,
    ...tableDesignEffects(design, shares.slice(0, -1)),
    effectiveN: headline.effectiveN,
    headline,
    groups,
    comparisons: {
      mixedModel:
        design.fixed.terms.length > 0
          ? {
              omnibus: null,
              contrasts,
              coefficients: design.fixed.columns.map((column, j) => {
                const w = waldTest(fit.beta, fit.vcovBeta, unit(fit.beta.length, j), CONFIDENCE)
                return { ...column, estimate: w.estimate, se: w.se, z: w.z, p: w.p }
              }),
              terms: hypotheses.map(({ term, rows }) => ({
                term,
                ...waldChiSquare(fit.beta, fit.vcovBeta, rows),
              })),
            }
          : null,
      unitMeans: unitMeans.test,
      naive,
      bootstrap,
    },
    balancedAnova: null,
    warnings: [],
    engine: { version: ENGINE_VERSION },
  }

  result.warnings = buildWarnings({
    ...designWarningFacts({ design, result, variation, constantConditions: [] }),
    unitMeansProblem: unitMeans.problem,
    zeroVarianceLevels: fit.components.filter((c) => c.variance === 0).map((c) => c.level),
    naiveShown: naive !== null,
    converged: fit.converged,
    family,
    overdispersion,
    edgeCells: groups
      .filter((g) => g.mean === 0 || (family === 'binomial' && g.mean === 1))
      .map((g) => g.condition),
  })
  return result
}

function keptRows(values: Float64Array, design: NestedDesign): Float64Array {
  if (!design.rowOfObs) return values
  return Float64Array.from(design.rowOfObs, (r) => values[r])
}

function unit(p: number, j: number): number[] {
  return Array.from({ length: p }, (_, k) => (k === j ? 1 : 0))
}

/** Mean of xᵢᵀβ over the observations (the fixed part only). */
function meanLinearPredictor(design: NestedDesign, fit: NestedGlmmFit): number {
  const p = fit.beta.length
  const cellEta = design.cells.labels.map((_, c) => {
    let eta = 0
    for (let j = 0; j < p; j++) eta += design.fixed.cellRows[c * p + j] * fit.beta[j]
    return eta
  })
  let sum = 0
  for (let i = 0; i < design.nObs; i++) sum += cellEta[design.cells.codes[i]]
  design.covariates.forEach(
    (cov, j) => (sum += design.nObs * cov.mean * fit.beta[design.fixed.covariateColumns[j]]),
  )
  return sum / design.nObs
}

/** Per design cell: successes (or count sum) and trials (or observations). */
function cellTotals(design: NestedDesign, trials: Float64Array | null) {
  const k = design.cells.labels.length
  const y = new Float64Array(k)
  const n = new Float64Array(k)
  for (let i = 0; i < design.nObs; i++) {
    const c = design.cells.codes[i]
    y[c] += design.y[i]
    n[c] += trials ? trials[i] : 1
  }
  return { y, n }
}

/** Each design cell: the plain proportion or rate, the naive and the model interval on the response scale. */
function cellSummaries(
  design: NestedDesign,
  fit: NestedGlmmFit,
  naive: { beta: number[]; vcov: number[][] },
  counts: { y: Float64Array; n: Float64Array },
): GroupSummary[] {
  const mean = FAMILIES[fit.family].mean
  const units = unitsPerCell(design)
  return design.cells.labels.map((label, c) => {
    const l = cellMeanRow(design, c)
    const model = waldTest(fit.beta, fit.vcovBeta, l, CONFIDENCE)
    const plain = waldTest(naive.beta, naive.vcov, l, CONFIDENCE)
    const deff = quadraticForm(l, fit.vcovBeta) / quadraticForm(l, naive.vcov)
    const observed = counts.y[c] / counts.n[c]
    const slope = (eta: number) => FAMILIES[fit.family].weight(mean(eta))
    const summary: GroupSummary = {
      condition: label,
      nObs: design.cells.counts[c],
      nUnits: units ? units[c] : null,
      effectiveN: design.cells.counts[c] / deff,
      designEffect: deff,
      mean: observed,
      naive: {
        se: slope(plain.estimate) * plain.se,
        df: null,
        ciLow: mean(plain.ci[0]),
        ciHigh: mean(plain.ci[1]),
      },
      clustered: {
        estimate: mean(model.estimate),
        se: slope(model.estimate) * model.se,
        df: null,
        ciLow: mean(model.ci[0]),
        ciHigh: mean(model.ci[1]),
      },
    }
    if (design.factors.length === 2) {
      summary.factorLevels = Object.fromEntries(
        design.factors.map((f, j) => [f.name, f.labels[design.cells.levelsOf[c][j]]]),
      )
    }
    return summary
  })
}

/** Every pair of design cells on the link scale, with its odds or rate ratio, Holm across the pairs. */
function pairwise(
  design: NestedDesign,
  fit: NestedGlmmFit,
  designEffectOf: (l: number[]) => number,
): WaldContrast[] {
  const labels = design.cells.labels
  const rows = labels.map((_, c) => cellMeanRow(design, c))
  const pairs: Omit<WaldContrast, 'pHolm'>[] = []
  for (let i = 0; i < labels.length; i++) {
    for (let j = i + 1; j < labels.length; j++) {
      const l = rows[j].map((v, k) => v - rows[i][k])
      const w = waldTest(fit.beta, fit.vcovBeta, l, CONFIDENCE)
      const deff = designEffectOf(l)
      pairs.push({
        a: labels[j],
        b: labels[i],
        estimate: w.estimate,
        se: w.se,
        z: w.z,
        p: w.p,
        ci: w.ci,
        ratio: Math.exp(w.estimate),
        ratioLow: Math.exp(w.ci[0]),
        ratioHigh: Math.exp(w.ci[1]),
        designEffect: deff,
        effectiveN: (design.cells.counts[i] + design.cells.counts[j]) / deff,
      })
    }
  }
  const adjusted = holmAdjust(pairs.map((p) => p.p))
  return pairs.map((p, i) => ({ ...p, pHolm: adjusted[i] }))
}

/** One Wald hypothesis per fixed term (a χ² does not depend on which rows span it). */
function hypothesesOf(design: NestedDesign) {
  return typeThreeHypotheses(
    design.fixed,
    design.factors.map((f) => f.labels.length),
  )
}

/** Pearson χ² / residual df of a count model, observation by observation. */
function pearsonRatio(
  design: NestedDesign,
  fit: NestedGlmmFit,
): { ratio: number; hasObservationLevel: boolean } {
  const { rows } = fit
  const muOfRow = new Float64Array(rows.nRows)
  for (let r = 0; r < rows.nRows; r++) {
    let eta = fit.innerEffect[rows.cell[r]]
    for (let j = 0; j < rows.p; j++) eta += rows.x[r * rows.p + j] * fit.beta[j]
    muOfRow[r] = Math.exp(eta)
  }
  let chi = 0
  if (rows.nRows === design.nObs) {
    for (let r = 0; r < rows.nRows; r++) chi += (rows.y[r] - muOfRow[r]) ** 2 / muOfRow[r]
  } else {
    const cellOf = nestedSufficientStats(design).cellOfObs
    for (let i = 0; i < design.nObs; i++) chi += (design.y[i] - muOfRow[cellOf[i]]) ** 2 / muOfRow[cellOf[i]]
  }
  const df = design.nObs - rows.p - design.terms.length
  const inner = design.randomLevels[design.randomLevels.length - 1]
  return { ratio: chi / df, hasObservationLevel: inner.nUnits === design.nObs }
}
