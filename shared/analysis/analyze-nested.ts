import type { AnalysisResult, BalancedAnovaCheck, LevelIcc } from '../schemas/analysis-result'
import { anovaNestedBalanced } from '../stats/anova-nested-balanced'
import { bootstrapForResult } from './bootstrap-for-result'
import { buildWarnings } from './build-warnings'
import { compareUnitMeans } from './compare-unit-means'
import { ENGINE_VERSION } from '../stats/engine-version'
import { fitNestedReml } from '../stats/fit-nested-reml'
import { naiveComparison } from './naive-comparison'
import { nestedDesignEffect } from '../stats/nested-design-effect'
import { observationsPerUnit } from '../stats/observations-per-unit'
import { omnibusF } from '../stats/omnibus-f'
import { oneWayAnova } from '../stats/one-way-anova'
import { pairwiseContrasts } from '../stats/pairwise-contrasts'
import { prepareNestedDesign } from '../stats/prepare-nested-design'
import { summariseConditions } from './summarise-conditions'
import type { NestedColumns, NestedDesign, NestedFit } from '../stats/types'
import { unitSizeSummary } from '../stats/unit-size-summary'

export interface AnalyzeNestedOptions {
  /** Reference condition of the model coding; default the first condition label. */
  reference?: Record<string, string>
  /** Adds a seeded hierarchical bootstrap (at least 100 resamples). */
  bootstrap?: { resamples: number; seed: string } | null
  /** Called just before the bootstrap starts, so a caller can show it as a stage of its own. */
  beforeBootstrap?: () => void
}

/** Level of every confidence interval in the result. */
const CONFIDENCE = 0.95
/** Examples of repeated labels kept per level in the result. */
const MAX_LABEL_EXAMPLES = 5

/**
 * The whole analysis of one nested data set, as the result document the app and the command
 * line show: the REML fit of the nested random-intercept model, variance components with their
 * shares, ICC per level, design effect and effective n, naive and cluster-correct means per
 * condition, the comparisons (mixed-model contrasts with Satterthwaite df and Holm-adjusted p,
 * omnibus F, the test on unit means, the naive test, optionally the hierarchical bootstrap),
 * the balanced-ANOVA cross-check, and warnings.
 *
 * Definitions (see the functions called for sources):
 * - share_l = σ_l² / (Σ_l σ_l² + σ²); ICC at level l = Σ of the shares at level l and above
 *   (correlation of two observations sharing the unit at level l).
 * - design effect = 1 + Σ_l ((cv_l² + 1) m̄_l − 1) share_l over the random levels (Eldridge,
 *   Ashby & Kerry 2006, summed per level); Kish's version sets cv_l = 0. Effective n = N / deff.
 * - ICC interval: F-based one-way interval (Searle 1971; Lessells & Boag 1987) when the design
 *   has a single random level and no condition; otherwise null.
 * - Unit-means test at the condition level (null, with a warning, when no level carries a
 *   single condition); the naive test is Welch for two conditions, a one-way ANOVA on all
 *   observations for three or more. Without a condition: one group "all", no comparisons.
 *
 * Guard errors (EngineInputError, from the parts): no level, fewer than 2 outermost units,
 * levels that cannot be told apart, a response with no variation, a condition with one label
 * or with fewer than 2 observations, an unknown reference, fewer than 100 bootstrap resamples.
 *
 * @example
 * analyzeNested(columns, { reference: { treatment: 'vehicle' } })
 * // → { nObs: 960, varianceComponents: [{ level: 'lab', variance: 48.1, share: 0.07 }, …],
 * //     designEffect: 5.2, effectiveN: 184.6, groups: [...], comparisons: {...}, warnings: [...] }
 */
export function analyzeNested(columns: NestedColumns, options: AnalyzeNestedOptions = {}): AnalysisResult {
  const design = prepareNestedDesign(
    columns,
    columns.factors?.[0] && options.reference?.[columns.factors[0].name] !== undefined
      ? { reference: options.reference[columns.factors[0].name] }
      : {},
  )
  const fit = fitNestedReml(design)

  const total = fit.components.reduce((sum, c) => sum + c.variance, 0)
  const shares = fit.components.map((c) => clamp01(c.variance / total))
  const randomShares = shares.slice(0, -1)
  const unitSizes = design.randomLevels.map((level) => observationsPerUnit(level))

  const deff = nestedDesignEffect(
    design.randomLevels.map((_, l) => ({ unitSizes: unitSizes[l], share: randomShares[l] })),
  )
  const designEffectTerms = design.randomLevels.map((level, l) => ({
    level: level.name,
    meanUnitSize: deff.terms[l].meanSize,
    unitSizeCv: deff.terms[l].cv,
    share: randomShares[l],
    term: deff.terms[l].term,
  }))
  const designEffectKish = 1 + deff.terms.reduce((sum, t, l) => sum + (t.meanSize - 1) * randomShares[l], 0)

  const groups = summariseConditions(design, fit, randomShares, CONFIDENCE)
  const contrasts = pairwiseContrasts(design, fit)
  const firstPair = contrasts.length > 0 ? { a: contrasts[0].a, b: contrasts[0].b } : null
  const unitMeans = compareUnitMeans(design, firstPair)
  const naive = naiveComparison(design, firstPair)
  let bootstrap = null
  if (options.bootstrap) {
    options.beforeBootstrap?.()
    bootstrap = bootstrapForResult(design, contrasts, { ...options.bootstrap, confidence: CONFIDENCE })
  }

  const givenLevels = design.randomLevels.filter((level) => !level.inserted)
  const result: AnalysisResult = {
    nObs: design.nObs,
    nDropped: design.nDropped,
    response: design.responseName,
    condition: design.condition?.name ?? null,
    reference: design.condition?.reference ?? null,
    conditionLevel: design.conditionLevel,
    levels: givenLevels.map((level, l) => {
      const { meanSize, cv } = unitSizeSummary(unitSizes[l], 'analyzeNested')
      return {
        name: level.name,
        nUnits: level.nUnits,
        minUnitSize: unitSizes[l].reduce((min, size) => Math.min(min, size), Infinity),
        meanUnitSize: meanSize,
        maxUnitSize: unitSizes[l].reduce((max, size) => Math.max(max, size), 0),
        unitSizeCv: cv,
      }
    }),
    implicitNesting: design.implicitNesting.map(({ level, labels }) => ({
      level,
      nRepeatedLabels: labels.length,
      examples: labels.slice(0, MAX_LABEL_EXAMPLES),
    })),
    varianceComponents: fit.components.map((c, i) => ({
      level: c.level,
      variance: c.variance,
      share: shares[i],
    })),
    icc: levelIccs(design, randomShares),
    singular: fit.singular,
    converged: fit.converged,
    remlCriterion: fit.remlCriterion,
    designEffect: deff.deff,
    designEffectKish,
    designEffectTerms,
    effectiveN: design.nObs / deff.deff,
    groups,
    comparisons: {
      mixedModel: design.condition ? { omnibus: omnibusF(design, fit), contrasts } : null,
      unitMeans: unitMeans.test,
      naive,
      bootstrap,
    },
    balancedAnova: balancedCheck(design, fit, total),
    warnings: [],
    engine: { version: ENGINE_VERSION },
  }

  result.warnings = buildWarnings({
    responseName: design.responseName,
    levels: givenLevels.map((level, l) => ({
      name: level.name,
      unitSizes: unitSizes[l],
      childrenPerUnit:
        l + 1 < givenLevels.length
          ? observationsPerUnit({ nUnits: level.nUnits, unitOfObs: givenLevels[l + 1].parentOfUnit })
          : null,
    })),
    condition: design.condition
      ? {
          name: design.condition.name,
          level: design.conditionLevel,
          unitsPerCondition: design.conditionLevel
            ? groups.map((g) => ({ condition: g.condition, nUnits: g.nUnits ?? 0 }))
            : [],
          constantConditions: groups.filter((g) => g.naive.se === 0).map((g) => g.condition),
        }
      : null,
    unitMeansProblem: unitMeans.problem,
    zeroVarianceLevels: fit.components
      .filter((c) => c.level !== 'residual' && c.variance === 0)
      .map((c) => c.level),
    implicitNesting: design.implicitNesting,
    nDropped: design.nDropped,
    naiveShown: naive !== null,
    converged: fit.converged,
  })
  return result
}

function clamp01(x: number): number {
  return Math.min(1, Math.max(0, x))
}

function levelIccs(design: NestedDesign, randomShares: number[]): LevelIcc[] {
  let oneWayCi: [number, number] | null = null
  if (design.randomLevels.length === 1 && !design.condition) {
    const level = design.randomLevels[0]
    const groups: number[][] = Array.from({ length: level.nUnits }, () => [])
    for (let i = 0; i < design.nObs; i++) groups[level.unitOfObs[i]].push(design.y[i])
    oneWayCi = oneWayAnova(groups, { confidence: CONFIDENCE }).iccCi
  }
  let cumulative = 0
  return design.randomLevels.map((level, l) => {
    cumulative += randomShares[l]
    return {
      level: level.name,
      icc: clamp01(cumulative),
      ciLow: oneWayCi ? oneWayCi[0] : null,
      ciHigh: oneWayCi ? oneWayCi[1] : null,
      ciMethod: oneWayCi ? ('one-way-f' as const) : null,
    }
  })
}

function balancedCheck(design: NestedDesign, fit: NestedFit, total: number): BalancedAnovaCheck | null {
  if (design.condition) return null
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
