import type { AnalysisResult, BalancedAnovaCheck, MixedModelContrast } from '../schemas/analysis-result'
import { anovaNestedBalanced } from '../stats/anova-nested-balanced'
import { cellMeans } from '../stats/cell-means'
import { contrastDesignEffect } from '../stats/contrast-design-effect'
import { ENGINE_VERSION } from '../stats/engine-version'
import { fitNestedReml } from '../stats/fit-nested-reml'
import { fixedCoefficients } from '../stats/fixed-coefficients'
import { fixedTermTests } from '../stats/fixed-term-tests'
import { modelFormula } from '../stats/model-formula'
import { oneWayAnova } from '../stats/one-way-anova'
import { pairwiseContrasts, type PairwiseContrast } from '../stats/pairwise-contrasts'
import { prepareNestedDesign } from '../stats/prepare-nested-design'
import { simpleEffects } from '../stats/simple-effects'
import { typeThreeHypotheses } from '../stats/type-three-hypotheses'
import type { NestedColumns, NestedDesign, NestedFit } from '../stats/types'
import { bootstrapIfAsked } from './bootstrap-for-result'
import { buildWarnings } from './build-warnings'
import { analyzeNestedGlmm } from './analyze-nested-glmm'
import { compareUnitMeans } from './compare-unit-means'
import { describeDesign, designWarningFacts, headlineQuantity } from './describe-design'
import { naiveComparison } from './naive-comparison'
import { summariseConditions } from './summarise-conditions'
import { effectVariation, tableDesignEffects, termIccs } from './term-summaries'
import type { AnalyzeNestedOptions } from './analyze-options'

export type { AnalyzeNestedOptions } from './analyze-options'

/** Level of every confidence interval in the result. */
const CONFIDENCE = 0.95

/**
 * The whole analysis of one nested data set, as the result document the app and the command
 * line show: the REML fit of the maximal nested model (every level × condition term the design
 * calls for, up to two factors as A * B, covariates), variance components with their shares, ICC
 * per term, the model in lme4 notation, cell means (naive and cluster-correct), coefficients,
 * type III term tests, pairwise contrasts with Holm-adjusted p and their design effects, simple
 * effects, how much each effect differs between units of a level, the test on unit means, the
 * naive test, optionally the hierarchical bootstrap, the balanced-ANOVA cross-check, and warnings.
 *
 * Definitions (see the functions called for sources):
 * - share_t = σ_t² / total; ICC of a term = Σ of the shares of the terms whose groups contain
 *   its groups (correlation of two observations that share its group).
 * - design effect of a quantity lᵀβ = its variance under the model / its variance if all
 *   observations were independent (Kish 1965); effective n = its observations / that ratio.
 *   The headline (designEffect, effectiveN) is that of the first comparison of the first factor
 *   (averaged over the second factor's labels), or of the mean without a condition.
 *   designEffectKish and designEffectTerms describe the mean of all observations.
 * - Unit-means test at the outermost level whose units each hold one design cell (null, with a
 *   warning, when none does); the naive test is Welch / one-way ANOVA for one factor, least
 *   squares with the model's terms for two factors or covariates.
 *
 * Guard errors (EngineInputError): those of prepareNestedDesign and fitNestedReml (thin, confounded
 * or constant input, an unknown reference), a cell with fewer than 2 observations, fewer than 100
 * bootstrap resamples.
 *
 * @example
 * analyzeNested(columns, { reference: { treatment: 'vehicle' } })
 * // → { nObs: 960, model: { formula: 'length ~ treatment + (1|lab) + (1|lab:treatment) + (1|lab:animal)', … },
 * //     designEffect: 3.1, effectiveN: 309.7, headline: { label: 'KX-9 − vehicle', … }, groups: [...], … }
 */
export function analyzeNested(columns: NestedColumns, options: AnalyzeNestedOptions = {}): AnalysisResult {
  if (columns.family === 'binomial' || columns.family === 'poisson')
    return analyzeNestedGlmm(columns, options)
  const design = prepareNestedDesign(columns, options.reference ? { reference: options.reference } : {})
  const fit = fitNestedReml(design)

  const total = fit.components.reduce((sum, c) => sum + c.variance, 0)
  const shares = fit.components.map((c) => clamp01(c.variance / total))
  const randomShares = shares.slice(0, -1)

  const means = cellMeans(design, fit, CONFIDENCE)
  const groups = summariseConditions(design, fit, means, CONFIDENCE)
  const pairs = pairwiseContrasts(design, fit, CONFIDENCE)
  const contrasts = pairs.map((pair) => withDesignEffect(design, fit, pair))
  const firstPair = contrasts.length > 0 ? { a: contrasts[0].a, b: contrasts[0].b } : null
  const terms = fixedTermTests(design, fit)
  const unitMeans = compareUnitMeans(design, firstPair)
  const naive = naiveComparison(design, firstPair, hypothesesFor(design))
  const headline = headlineQuantity(design, contrasts, (l) => contrastDesignEffect(design, fit, l))
  const bootstrap = bootstrapIfAsked(design, contrasts, options, CONFIDENCE)

  const { random, ...described } = describeDesign(design)
  const variation = effectVariation(
    design,
    fit.components.map((c) => c.variance),
  )
  const result: AnalysisResult = {
    ...described,
    model: { formula: modelFormula(design), random, skipped: design.skippedTerms },
    varianceComponents: fit.components.map((c, i) => ({
      level: c.level,
      variance: c.variance,
      share: shares[i],
    })),
    effectVariation: variation,
    icc: termIccs(design, randomShares, oneWayIccInterval(design)),
    singular: fit.singular,
    converged: fit.converged,
    remlCriterion: fit.remlCriterion,
    designEffect: headline.designEffect,
    ...tableDesignEffects(design, randomShares),
    effectiveN: headline.effectiveN,
    headline,
    groups,
    comparisons: {
      mixedModel:
        design.fixed.terms.length > 0
          ? {
              omnibus: omnibusOf(design, terms),
              contrasts,
              coefficients: fixedCoefficients(design, fit),
              terms: terms.map(({ term, f, df1, df2, p }) => ({ term, df1, df2, f, p })),
              ...(design.factors.length === 2
                ? { simpleEffects: simpleEffects(design, fit, CONFIDENCE) }
                : {}),
            }
          : null,
      unitMeans: unitMeans.test,
      naive,
      bootstrap,
    },
    balancedAnova: balancedCheck(design, fit, total),
    warnings: [],
    engine: { version: ENGINE_VERSION },
  }

  result.warnings = buildWarnings({
    ...designWarningFacts({
      design,
      result,
      variation,
      constantConditions: groups.filter((g) => g.naive.se === 0).map((g) => g.condition),
    }),
    unitMeansProblem: unitMeans.problem,
    zeroVarianceLevels: fit.components
      .filter((c) => c.level !== 'residual' && c.variance === 0)
      .map((c) => c.level),
    naiveShown: naive !== null,
    converged: fit.converged,
  })
  return result
}

function clamp01(x: number): number {
  return Math.min(1, Math.max(0, x))
}

function withDesignEffect(design: NestedDesign, fit: NestedFit, pair: PairwiseContrast): MixedModelContrast {
  const { weights, ...contrast } = pair
  const deff = contrastDesignEffect(design, fit, weights)
  const n =
    design.cells.counts[design.cells.labels.indexOf(pair.a)] +
    design.cells.counts[design.cells.labels.indexOf(pair.b)]
  return { ...contrast, designEffect: deff, effectiveN: n / deff }
}

/** F test of all conditions equal: the factor's term test when there is one factor with 3 or more labels. */
function omnibusOf(design: NestedDesign, terms: ReturnType<typeof fixedTermTests>) {
  if (design.factors.length !== 1 || design.factors[0].labels.length < 3) return null
  const { f, df1, df2, p } = terms.find((t) => t.term === design.factors[0].name)!
  return { f, df1, df2, p }
}

/** The hypotheses of the mixed model's term tests, reused for the naive least-squares fit. */
function hypothesesFor(design: NestedDesign) {
  return typeThreeHypotheses(
    design.fixed,
    design.factors.map((f) => f.labels.length),
  )
}

/** F-based interval of the ICC in a one-way layout (one level, no fixed terms), else null. */
function oneWayIccInterval(design: NestedDesign): [number, number] | null {
  if (design.randomLevels.length !== 1 || design.fixed.terms.length > 0) return null
  const level = design.randomLevels[0]
  const groups: number[][] = Array.from({ length: level.nUnits }, () => [])
  for (let i = 0; i < design.nObs; i++) groups[level.unitOfObs[i]].push(design.y[i])
  return oneWayAnova(groups, { confidence: CONFIDENCE }).iccCi
}

function balancedCheck(design: NestedDesign, fit: NestedFit, total: number): BalancedAnovaCheck | null {
  if (design.fixed.terms.length > 0) return null
  const anova = anovaNestedBalanced(design)
  if (!anova) return null
  const maxDifferenceToReml = Math.max(
    ...anova.components.map((c, i) => Math.abs(c.variance - fit.components[i].variance) / total),
  )
  return {
    table: anova.table,
    components: anova.components,
    anyNegative: anova.anyNegative,
    maxDifferenceToReml,
  }
}
