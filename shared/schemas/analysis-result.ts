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

/** The fields of the older interval form kept in `groups` (the command-line contract). */
const LegacyInterval = {
  se: z.number().nonnegative(),
  /** t degrees of freedom; null for a binary or count model, whose intervals come from the normal (Wald). */
  df: z.number().positive().nullable(),
  ciLow: z.number(),
  ciHigh: z.number(),
}

/**
 * The one interval shape of the engine, the stored result and the charts: an estimate, its
 * standard error, the df of its t distribution (Satterthwaite for model quantities) and the
 * 95 % interval [low, high].
 */
export const Interval = z.object({
  estimate: z.number(),
  se: z.number().nonnegative(),
  /** t degrees of freedom; null for a Wald (normal) interval of a binary or count model. */
  df: z.number().positive().nullable(),
  ci: z.tuple([z.number(), z.number()]),
})
export type Interval = z.infer<typeof Interval>

export const GroupSummary = z.object({
  /** Condition label, or "all" when there is no condition. */
  condition: z.string(),
  nObs: count,
  /** Units carrying this condition at the condition level (null without a condition level). */
  nUnits: count.nullable(),
  /**
   * For the arm's mean (engine ≥ 0.2): observations / designEffect, where designEffect is the
   * variance of this arm's model mean divided by its variance if its observations were independent.
   * Per-arm values do not add up to the comparison's effective n: each is for one mean alone.
   */
  effectiveN: z.number().positive(),
  designEffect: z.number().positive(),
  /** Plain mean of the observations. */
  mean: z.number(),
  /** Treats every observation as independent: SD/√n, t with n − 1 df. Shown as the wrong answer. */
  naive: z.object(LegacyInterval),
  /** From the mixed model (its mean estimate can differ from the plain mean when units are unbalanced); Satterthwaite df. */
  clustered: z.object({ estimate: z.number(), ...LegacyInterval }),
  /**
   * Two condition factors: this group is one design cell, and here are its level of each factor
   * (`condition` is then "a:b"). Absent for one factor or none.
   */
  factorLevels: z.record(z.string(), z.string()).optional(),
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
  /** 95 % interval from the t distribution with `df` (engine ≥ 0.2). */
  ci: z.tuple([z.number(), z.number()]).optional(),
  /** Variance of this difference under the model / its variance if every observation were independent (Kish 1965). */
  designEffect: z.number().positive().optional(),
  /** Observations of the two arms / designEffect. */
  effectiveN: z.number().positive().optional(),
})
export type MixedModelContrast = z.infer<typeof MixedModelContrast>

/**
 * One fixed-effect coefficient in treatment coding against the reference levels (the
 * command-line contract): the intercept is term "(intercept)" with level null; a factor's
 * coefficient is term = the column and level = the non-reference level; a covariate's slope is
 * term = the column and level null; an interaction is term "A:B" with level "a:b".
 */
export const Coefficient = z.object({
  term: z.string(),
  level: z.string().nullable(),
  estimate: z.number(),
  se: z.number().nonnegative(),
  df: z.number().positive(),
  t: z.number(),
  p: probability,
})
export type Coefficient = z.infer<typeof Coefficient>

/** A type III F test of one fixed term ("A", "B", "A:B" or a covariate), Satterthwaite df2 as lmerTest's anova(type = 3). */
export const TermTest = z.object({
  term: z.string(),
  df1: z.number().positive(),
  df2: z.number().positive(),
  f: z.number().nonnegative(),
  p: probability,
})
export type TermTest = z.infer<typeof TermTest>

/** The effect of one factor within one level of the other (two factors only). */
export const SimpleEffect = z.object({
  factor: z.string(),
  at: z.object({ factor: z.string(), level: z.string() }),
  /** F test of "all levels of `factor` equal at this level" (Satterthwaite). */
  test: TermTest.omit({ term: true }),
  /** Each level of `factor` against its reference, at this level: a − b. */
  contrasts: z.array(
    z.object({ a: z.string(), b: z.string(), t: z.number(), p: probability }).extend(Interval.shape),
  ),
})
export type SimpleEffect = z.infer<typeof SimpleEffect>

/** A condition factor of the model. */
export const FactorSummary = z.object({
  name: z.string(),
  /** Reference first, then the others in file order. */
  labels: z.array(z.string()),
  reference: z.string(),
  /** Outermost given level whose units each carry a single level of this factor; null when none does. */
  level: z.string().nullable(),
})
export type FactorSummary = z.infer<typeof FactorSummary>

/** A numeric covariate; condition means and contrasts are adjusted to its mean. */
export const CovariateSummary = z.object({
  name: z.string(),
  mean: z.number(),
  sd: z.number().nonnegative(),
  /** Outermost given level within whose units it is constant (measured per unit); null: it varies per observation. */
  level: z.string().nullable(),
})
export type CovariateSummary = z.infer<typeof CovariateSummary>

/** One random intercept of the fitted model. */
export const RandomTerm = z.object({
  /** "lab", or "lab:treatment" for a level × condition term (lme4's name for the grouping). */
  name: z.string(),
  level: z.string(),
  /** The factor (or "A:B") crossed with the level; null for the level itself. */
  factor: z.string().nullable(),
  nGroups: count,
})
export type RandomTerm = z.infer<typeof RandomTerm>

export const ModelDescription = z.object({
  /** The fitted model in lme4 notation, e.g. "length ~ treatment + (1|lab) + (1|lab:treatment) + (1|lab:animal)". */
  formula: z.string(),
  random: z.array(RandomTerm),
  /** Level × condition terms left out because their groups are those of another term or of the observations. */
  skipped: z.array(z.object({ name: z.string(), sameAs: z.string() })),
  /** Binary and count responses: the family in R's notation, to refit with glmer(formula, family = …). */
  family: z.string().optional(),
})
export type ModelDescription = z.infer<typeof ModelDescription>

/** How much a condition's effect differs between the units of a level (from a level × condition variance). */
export const EffectVariation = z.object({
  /** The random term, e.g. "lab:treatment". */
  term: z.string(),
  level: z.string(),
  factor: z.string(),
  variance: z.number().nonnegative(),
  /** SD of the difference between two levels of the factor from one unit to the next: √(2 · variance). */
  effectSd: z.number().nonnegative(),
  /** Units of `level` the variance is estimated from. */
  nUnits: count,
})
export type EffectVariation = z.infer<typeof EffectVariation>

/** The quantity the headline design effect and effective n belong to. */
export const HeadlineQuantity = z.object({
  /** "mean" (no condition), or a contrast "a − b" (the first comparison of the first factor). */
  label: z.string(),
  designEffect: z.number().positive(),
  effectiveN: z.number().positive(),
})
export type HeadlineQuantity = z.infer<typeof HeadlineQuantity>

/** A coefficient of a binary or count model: Wald z test on the link scale, as glmer's summary. */
export const WaldCoefficient = z.object({
  term: z.string(),
  level: z.string().nullable(),
  estimate: z.number(),
  se: z.number().nonnegative(),
  z: z.number(),
  p: probability,
})
export type WaldCoefficient = z.infer<typeof WaldCoefficient>

/** A pairwise contrast of a binary or count model: on the link scale, with its odds or rate ratio. */
export const WaldContrast = z.object({
  a: z.string(),
  b: z.string(),
  /** Difference of the cells' linear predictors (log odds or log rate): a − b. */
  estimate: z.number(),
  se: z.number().nonnegative(),
  z: z.number(),
  p: probability,
  pHolm: probability,
  /** 95 % Wald interval of the estimate (link scale). */
  ci: z.tuple([z.number(), z.number()]),
  /** exp(estimate): the odds ratio (binomial) or rate ratio (Poisson) of a against b, with its 95 % interval. */
  ratio: z.number().positive(),
  ratioLow: z.number().nonnegative(),
  ratioHigh: z.number().positive(),
  /** Variance of the estimate under the model / under the model without units (every observation independent). */
  designEffect: z.number().positive(),
  effectiveN: z.number().positive(),
})
export type WaldContrast = z.infer<typeof WaldContrast>

/** A Wald chi-square test of one fixed term of a binary or count model (type III hypotheses). */
export const WaldTermTest = z.object({
  term: z.string(),
  df: z.number().positive(),
  chisq: z.number().nonnegative(),
  p: probability,
})
export type WaldTermTest = z.infer<typeof WaldTermTest>

/** True for a coefficient or contrast of a binary or count model (Wald z), false for one of a normal response (t with df). */
export function isWald<T extends object>(x: T): x is Extract<T, { z: number }> {
  return 'z' in x
}

/** True for a term test of a binary or count model (Wald χ²), false for an F test. */
export function isWaldTerm(x: TermTest | WaldTermTest): x is WaldTermTest {
  return 'chisq' in x
}

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
  z.object({
    /** Two factors: a two-way ANOVA (type III, as the model's terms) on the means of the units carrying one design cell. */
    method: z.literal('two-way-anova'),
    level: z.string(),
    nUnits: count,
    terms: z.array(TermTest),
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
  z.object({
    /** Two factors or covariates: the same fixed terms fitted by least squares on all observations, as if independent. */
    method: z.literal('linear-model'),
    terms: z.array(TermTest),
  }),
  z.object({
    /** Binary response, one factor: Pearson's chi-square test of the conditions × outcome table, all observations as if independent. */
    method: z.literal('chi-square'),
    chisq: z.number().nonnegative(),
    df: z.number().positive(),
    p: probability,
  }),
  z.object({
    /** Binary or count response otherwise: the model's fixed terms in a GLM without units (Wald tests), as if independent. */
    method: z.literal('glm'),
    terms: z.array(WaldTermTest),
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
  /**
   * Engine ≥ 0.3: the response distribution (absent: gaussian). Binary and count responses are
   * fitted as GLMMs by the Laplace approximation; their variance components, shares and ICC are
   * on the latent (link) scale, with the latent residual as the "residual" component (Nakagawa,
   * Johnson & Schielzeth 2017), and their group means are proportions or rates.
   */
  family: z.enum(['gaussian', 'binomial', 'poisson']).optional(),
  /**
   * A yes/no response read from two values (a binomial response without trials): the value
   * counted as yes (1) and the other one (null when no kept row holds it). Set by the caller that
   * turned the values into 0/1 (the app's run, the command line); absent otherwise.
   */
  outcome: z.object({ positive: z.string(), negative: z.string().nullable() }).optional(),
  condition: z.string().nullable(),
  /** Reference condition of the model's treatment coding ("a:b" of the reference levels for two factors). */
  reference: z.string().nullable(),
  /** Outermost given level whose units each carry one condition (one design cell for two factors); null when none does or without a condition. */
  conditionLevel: z.string().nullable(),
  /** Engine ≥ 0.2: the condition factors (zero, one or two). */
  factors: z.array(FactorSummary).optional(),
  /** Engine ≥ 0.2: numeric covariates the comparisons are adjusted for. */
  covariates: z.array(CovariateSummary).optional(),
  /** Engine ≥ 0.2: the fitted model, in lme4 notation and term by term. */
  model: ModelDescription.optional(),
  levels: z.array(LevelSummary),
  /** Levels whose unit labels repeat under different parents; units are keyed by full path anyway. */
  implicitNesting: z.array(
    z.object({ level: z.string(), nRepeatedLabels: count, examples: z.array(z.string()) }),
  ),
  /** Random terms outer → inner (including "<level>:<factor>" terms), then "residual". */
  varianceComponents: z.array(VarianceComponentShare),
  /** Engine ≥ 0.2: one per level × condition term: how much the effect differs between that level's units. */
  effectVariation: z.array(EffectVariation).optional(),
  /** One per random level, outer → inner. */
  icc: z.array(LevelIcc),
  /** True when a variance component is estimated as 0 (a boundary fit, not a failure). */
  singular: z.boolean(),
  converged: z.boolean(),
  /** −2 × restricted log-likelihood (normal responses); null for binary and count responses, fitted by the Laplace approximation. */
  remlCriterion: z.number().nullable(),
  /**
   * Engine ≥ 0.2: the design effect of the headline quantity (see `headline`): its variance under
   * the fitted model divided by its variance if all observations were independent (Kish 1965).
   * Engine 0.1: 1 + Σ per-level terms for the table as a whole.
   */
  designEffect: z.number().positive(),
  /** For the mean of all observations, with every unit at its level's mean size: 1 + Σ (m̄_l − 1) share_l (Kish). */
  designEffectKish: z.number().positive(),
  /** For the mean of all observations: each level's term ((cv² + 1) m̄ − 1) · share (Eldridge, Ashby & Kerry 2006). */
  designEffectTerms: z.array(DesignEffectTerm),
  /** nObs / designEffect. */
  effectiveN: z.number().positive(),
  /** Engine ≥ 0.2: which quantity designEffect and effectiveN belong to. */
  headline: HeadlineQuantity.optional(),
  groups: z.array(GroupSummary),
  comparisons: z.object({
    /** null without a condition or covariate. */
    mixedModel: z
      .object({
        /** F test of all conditions equal (Satterthwaite); null for fewer than 3 conditions and for two factors. */
        omnibus: FTest.nullable(),
        /** Pairwise differences of the condition means (design cells for two factors), Holm across all pairs. */
        contrasts: z.array(z.union([MixedModelContrast, WaldContrast])),
        /** Engine ≥ 0.2: every fixed-effect coefficient with Satterthwaite df. */
        coefficients: z.array(z.union([Coefficient, WaldCoefficient])).optional(),
        /** Engine ≥ 0.2: type III F test per fixed term. */
        terms: z.array(z.union([TermTest, WaldTermTest])).optional(),
        /** Engine ≥ 0.2, two factors of a normal response: each factor within each level of the other. */
        simpleEffects: z.array(SimpleEffect).optional(),
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
