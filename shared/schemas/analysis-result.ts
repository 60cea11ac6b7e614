import { z } from 'zod'

/**
 * The engine's result document: what `analyzeNested` returns, what the command line prints and
 * what the API stores and serves. Numbers are JSON numbers; a quantity that cannot be computed for
 * a design is null, never a string or NaN.
 */

const count = z.number().int().nonnegative()
const probability = z.number().min(0).max(1)

export const LevelSummary = z.object({
  /** Level name as given, outer → inner. */
  name: z.string(),
  /** Units at this level, keyed by their full path (animal "3" of lab A ≠ animal "3" of lab B). */
  nUnits: count,
  /** Observations per unit: smallest, mean, largest, and coefficient of variation (SD with divisor k). */
  minUnitSize: count,
  meanUnitSize: z.number(),
  maxUnitSize: count,
  unitSizeCv: z.number(),
})
export type LevelSummary = z.infer<typeof LevelSummary>

export const VarianceComponentShare = z.object({
  /** A given level, an added "<level>:condition" level, or "residual". */
  level: z.string(),
  variance: z.number().nonnegative(),
  /** variance / sum of all components. */
  share: probability,
})
export type VarianceComponentShare = z.infer<typeof VarianceComponentShare>

export const LevelIcc = z.object({
  level: z.string(),
  /** Correlation of two observations that share the unit at this level: Σ components at this level and above / total. */
  icc: probability,
  /** Confidence interval where the design allows one (see ciMethod), else null. */
  ciLow: probability.nullable(),
  ciHigh: probability.nullable(),
  /** 'one-way-f': F-based interval of a one-way layout (Searle 1971; Lessells & Boag 1987). */
  ciMethod: z.enum(['one-way-f']).nullable(),
})
export type LevelIcc = z.infer<typeof LevelIcc>

export const DesignEffectTerm = z.object({
  level: z.string(),
  meanUnitSize: z.number(),
  unitSizeCv: z.number(),
  share: probability,
  /** ((cv² + 1) m̄ − 1) · share: this level's contribution to the design effect. */
  term: z.number(),
})
export type DesignEffectTerm = z.infer<typeof DesignEffectTerm>

const Interval = {
  se: z.number().nonnegative(),
  df: z.number().positive(),
  ciLow: z.number(),
  ciHigh: z.number(),
}

export const GroupSummary = z.object({
  /** Condition label, or "all" when there is no condition. */
  condition: z.string(),
  nObs: count,
  /** Units carrying this condition at the condition level (null without a condition level). */
  nUnits: count.nullable(),
  /** Observations / this condition's design effect. */
  effectiveN: z.number().positive(),
  designEffect: z.number().positive(),
  /** Plain mean of the observations. */
  mean: z.number(),
  /** Treats every observation as independent: SD/√n, t with n − 1 df. Shown as the wrong answer. */
  naive: z.object(Interval),
  /** From the mixed model (its mean estimate can differ from the plain mean when units are unbalanced); Satterthwaite df. */
  clustered: z.object({ estimate: z.number(), ...Interval }),
})
export type GroupSummary = z.infer<typeof GroupSummary>

export const FTest = z.object({
  f: z.number().nonnegative(),
  df1: z.number().positive(),
  df2: z.number().positive(),
  p: probability,
})
export type FTest = z.infer<typeof FTest>

export const MixedModelContrast = z.object({
  a: z.string(),
  b: z.string(),
  /** mean(a) − mean(b) from the model. */
  estimate: z.number(),
  se: z.number().nonnegative(),
  df: z.number().positive(),
  t: z.number(),
  p: probability,
  /** Holm-adjusted over all pairwise contrasts. */
  pHolm: probability,
})
export type MixedModelContrast = z.infer<typeof MixedModelContrast>

export const UnitMeansTest = z.discriminatedUnion('method', [
  z.object({
    /** Two conditions: Student's pooled-variance t-test on unit means (Lord et al. 2020). */
    method: z.literal('student-t'),
    level: z.string(),
    /** Units compared (all conditions together). */
    nUnits: count,
    /** Condition pair, oriented as the first mixed-model contrast: mean of a's unit means − mean of b's. */
    a: z.string(),
    b: z.string(),
    estimate: z.number(),
    se: z.number().nonnegative(),
    t: z.number(),
    df: z.number().positive(),
    p: probability,
  }),
  z.object({
    /** Three or more conditions: one-way ANOVA on unit means. */
    method: z.literal('one-way-anova'),
    level: z.string(),
    nUnits: count,
    f: z.number().nonnegative(),
    df1: z.number().positive(),
    df2: z.number().positive(),
    p: probability,
  }),
])
export type UnitMeansTest = z.infer<typeof UnitMeansTest>

export const NaiveTest = z.discriminatedUnion('method', [
  z.object({
    /** Two conditions: Welch t-test on all observations, as if independent. Wrong for nested data. */
    method: z.literal('welch'),
    a: z.string(),
    b: z.string(),
    /** mean(a) − mean(b) of the observations. */
    estimate: z.number(),
    se: z.number().nonnegative(),
    t: z.number(),
    df: z.number().positive(),
    p: probability,
  }),
  z.object({
    /** Three or more conditions: one-way ANOVA on all observations, as if independent. */
    method: z.literal('one-way-anova'),
    f: z.number().nonnegative(),
    df1: z.number().positive(),
    df2: z.number().positive(),
    p: probability,
  }),
])
export type NaiveTest = z.infer<typeof NaiveTest>

export const BootstrapInterval = z.object({
  /** The statistic on the original data (plain mean of the observations, or difference of such means). */
  estimate: z.number(),
  /** SD over the resamples. */
  se: z.number().nonnegative(),
  /** Percentile interval. */
  ciLow: z.number(),
  ciHigh: z.number(),
})

export const BootstrapResult = z.object({
  resamples: z.number().int().positive(),
  seed: z.string(),
  confidence: probability,
  /** Innermost groups of at least this many observations have their resampled sum drawn from its normal approximation. */
  exactBelow: z.number(),
  approximatedGroups: count,
  innermostGroups: count,
  groups: z.array(BootstrapInterval.extend({ condition: z.string() })),
  contrasts: z.array(
    BootstrapInterval.extend({
      a: z.string(),
      b: z.string(),
      /** 2 · min(share of resampled differences ≤ 0, share ≥ 0); a resampling summary, not an exact test. */
      p: probability,
    }),
  ),
})
export type BootstrapResult = z.infer<typeof BootstrapResult>

export const BalancedAnovaCheck = z.object({
  table: z.array(
    z.object({
      level: z.string(),
      df: z.number(),
      sumOfSquares: z.number(),
      meanSquare: z.number(),
      unitSize: z.number(),
    }),
  ),
  /** Variance components from expected mean squares (can be negative). */
  components: z.array(z.object({ level: z.string(), variance: z.number() })),
  /** True when an estimate is negative; REML then truncates it at 0 and the two disagree. */
  anyNegative: z.boolean(),
  /** Largest |ANOVA − REML| / REML total variance over the components. */
  maxDifferenceToReml: z.number().nonnegative(),
})
export type BalancedAnovaCheck = z.infer<typeof BalancedAnovaCheck>

export const EngineWarning = z.object({
  code: z.string().regex(/^[A-Z][A-Z0-9_]*$/),
  message: z.string(),
})
export type EngineWarning = z.infer<typeof EngineWarning>

export const AnalysisResult = z.object({
  /** Observations used (rows with a response and every label). */
  nObs: count,
  /** Rows left out because a value was missing. */
  nDropped: count,
  response: z.string(),
  condition: z.string().nullable(),
  /** Reference condition of the model's treatment coding. */
  reference: z.string().nullable(),
  /** Outermost given level whose units each carry one condition; null when none does or without a condition. */
  conditionLevel: z.string().nullable(),
  levels: z.array(LevelSummary),
  /** Levels whose unit labels repeat under different parents; units are keyed by full path anyway. */
  implicitNesting: z.array(
    z.object({ level: z.string(), nRepeatedLabels: count, examples: z.array(z.string()) }),
  ),
  /** Random levels outer → inner (including "<level>:condition"), then "residual". */
  varianceComponents: z.array(VarianceComponentShare),
  /** One per random level, outer → inner. */
  icc: z.array(LevelIcc),
  /** True when a variance component is estimated as 0 (a boundary fit, not a failure). */
  singular: z.boolean(),
  converged: z.boolean(),
  remlCriterion: z.number(),
  /** 1 + Σ per-level terms, allowing for unequal unit sizes. */
  designEffect: z.number().positive(),
  /** The same with every unit at its level's mean size (Kish). */
  designEffectKish: z.number().positive(),
  designEffectTerms: z.array(DesignEffectTerm),
  /** nObs / designEffect. */
  effectiveN: z.number().positive(),
  groups: z.array(GroupSummary),
  comparisons: z.object({
    /** null without a condition. */
    mixedModel: z
      .object({
        /** F test of all conditions equal (Satterthwaite); null for fewer than 3 conditions. */
        omnibus: FTest.nullable(),
        contrasts: z.array(MixedModelContrast),
      })
      .nullable(),
    /** "Summarise first" test at conditionLevel; null without a condition or when no level carries a single condition. */
    unitMeans: UnitMeansTest.nullable(),
    /** Treats observations as independent; null without a condition. */
    naive: NaiveTest.nullable(),
    bootstrap: BootstrapResult.nullable(),
  }),
  /** Classic ANOVA estimates when the design has no condition and is balanced (equal sizes at every level), else null. */
  balancedAnova: BalancedAnovaCheck.nullable(),
  warnings: z.array(EngineWarning),
  engine: z.object({ version: z.string() }),
})
export type AnalysisResult = z.infer<typeof AnalysisResult>
