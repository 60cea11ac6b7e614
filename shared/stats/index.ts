/**
 * The public functions of the statistics library, one per file, grouped by what they are for.
 * Pure functions of typed inputs: no I/O, no schemas, no product wording (the product's assembly
 * of them lives in shared/analysis). Internals (reml/, design/) are not part of this list.
 */

// ── Nested mixed models: design, fit, inference
/** Raw columns → the maximal nested design: units keyed by path, factors coded, level × condition terms. */
export { prepareNestedDesign } from './prepare-nested-design'
/** REML fit of the maximal nested random-intercept model (sufficient statistics, Woodbury per unit). */
export { fitNestedReml } from './fit-nested-reml'
/** The fitted model in lme4 formula notation. */
export { modelFormula } from './model-formula'
/** t test of one linear combination of the fixed effects with Satterthwaite df. */
export { satterthwaiteContrast } from './satterthwaite-contrast'
/** F test of several linear combinations with Satterthwaite denominator df. */
export { satterthwaiteF } from './satterthwaite-f'
/** Every fixed-effect coefficient with SE, Satterthwaite df, t and p. */
export { fixedCoefficients } from './fixed-coefficients'
/** One F test per fixed term (type III, as lmerTest's anova). */
export { fixedTermTests } from './fixed-term-tests'
/** Type I (sequential) hypotheses of the fixed terms, as lmerTest builds them. */
export { typeOneHypotheses } from './type-one-hypotheses'
/** Type III hypotheses of the fixed terms, as lmerTest builds them. */
export { typeThreeHypotheses } from './type-three-hypotheses'
/** Model mean of each design cell with its Satterthwaite interval. */
export { cellMeans } from './cell-means'
/** The fixed-effects row of one design cell's mean, covariates at their means. */
export { cellMeanRow } from './cell-mean-row'
/** All pairwise differences of design-cell means, Holm-adjusted. */
export { pairwiseContrasts } from './pairwise-contrasts'
/** Each factor's effect within each level of the other (two factors). */
export { simpleEffects } from './simple-effects'
/** Design effect of one estimated quantity: its variance under the model over its variance if independent. */
export { contrastDesignEffect } from './contrast-design-effect'
/** F tests of linear hypotheses in an ordinary least-squares fit. */
export { leastSquaresTermTests } from './least-squares-term-tests'
/** Classic ANOVA of a balanced nested design (cross-check of REML). */
export { anovaNestedBalanced } from './anova-nested-balanced'
/** Hierarchical (multi-level) bootstrap of condition means and their differences. */
export { hierarchicalBootstrap } from './hierarchical-bootstrap'

// ── Binary and count responses (generalised linear mixed models)
/** Laplace fit of the maximal nested model for a yes/no, successes-of-trials or count response (as glmer, nAGQ = 1). */
export { fitNestedGlmm } from './fit-nested-glmm'
/** Wald z test and interval of one linear combination of the fixed effects. */
export { waldTest } from './wald-test'
/** Wald chi-square test of several linear combinations (a fixed term). */
export { waldChiSquare } from './wald-chi-square'
/** The residual variance on the latent scale of a logit or log link, for ICCs (Nakagawa et al. 2017). */
export { latentResidualVariance } from './latent-residual-variance'

// ── Classic tests and summaries
/** Welch's two-sample t test from group summaries. */
export { welchTest } from './welch-test'
/** One-way ANOVA with the ICC(1) and its F-based interval. */
export { oneWayAnova } from './one-way-anova'
/** t test or one-way ANOVA on unit means ("summarise first"). */
export { unitMeansTest } from './unit-means-test'
/** Holm's step-down adjustment of p-values. */
export { holmAdjust } from './holm-adjust'
/** Observations per unit of a level. */
export { observationsPerUnit } from './observations-per-unit'
/** Mean size and coefficient of variation of unit sizes. */
export { unitSizeSummary } from './unit-size-summary'

// ── Design effect, planning and power
/** Design effect of a mean from unit size and ICC (Kish; unequal sizes after Eldridge et al.). */
export { designEffect } from './design-effect'
/** Design effect of a mean over several nested levels. */
export { nestedDesignEffect } from './nested-design-effect'
/** Observations / design effect. */
export { effectiveN } from './effective-n'
/** Total variance from an SD or a variance. */
export { totalVariance } from './total-variance'
/** Power of a two-arm comparison of whole units. */
export { clusterPower } from './cluster-power'
/** Units per arm needed for a target power. */
export { unitsNeeded } from './units-needed'
/** Cost-optimal observations per unit. */
export { costOptimalObsPerUnit } from './cost-optimal-obs-per-unit'
/** ICC of a yes/no or count response on the observations' scale, from the latent unit variance. */
export { observedScaleIcc } from './observed-scale-icc'
/** Cheapest design reaching a target power. */
export { planDesign } from './plan-design'
/** Variance and df of the difference of two arms in a design of labs, units and observations. */
export { threeLevelVariance } from './three-level-variance'
/** Power of that comparison (two-sided t, noncentral). */
export { threeLevelPower } from './three-level-power'
/** Cheapest design of labs, units per lab and observations per unit reaching a target power. */
export { planThreeLevel } from './plan-three-level'
/** Cost-optimal units per lab and arm for a fixed budget. */
export { costOptimalUnitsPerLab } from './cost-optimal-units-per-lab'
/** Power of a two-sided t test from its df and noncentrality. */
export { twoSidedTPower } from './two-sided-t-power'
/** Design with the fewest independent units reaching a target power (a plan without costs). */
export { planFewestUnits } from './plan-fewest-units'
/** Power over a grid of designs. */
export { powerCurve } from './power-curve'

// ── Agreement between laboratories (ISO 5725-2)
/** Repeatability, between-lab and reproducibility SDs. */
export { labPrecision } from './lab-precision'
/** Checks laboratory summaries for the ISO 5725-2 functions. */
export { checkLabSummaries } from './lab-summaries'
/** Mandel's h per laboratory. */
export { mandelH } from './mandel-h'
/** Mandel's k per laboratory. */
export { mandelK } from './mandel-k'
/** Cochran's test for the largest laboratory variance. */
export { cochranTest } from './cochran-test'
/** Grubbs' test for outlying laboratory means. */
export { grubbsTest } from './grubbs-test'
/** Classifies a statistic against its 5 % and 1 % critical values. */
export { precisionFlag } from './precision-flag'

// ── Distributions
/** Two-sided p of a t statistic, accurate far into the tail. */
export { studentTTwoSidedP } from './reml/student-t-two-sided-p'
/** Upper-tail p of an F statistic. */
export { fUpperP } from './reml/f-upper-p'
/** Upper-tail p of a t statistic. */
export { studentTUpperP } from './student-t-upper-p'
/** Quantile of Student's t. */
export { studentTQuantile } from './student-t-quantile'
/** Upper-tail p of a standard normal statistic. */
export { normalUpperP } from './normal-upper-p'
/** Quantile of the standard normal. */
export { normalQuantile } from './normal-quantile'
/** Upper-tail p of a chi-square statistic (df up to CHI_SQUARE_MAX_DF). */
export { chiSquareUpperP, CHI_SQUARE_MAX_DF } from './chi-square-upper-p'
/** Quantile of the F distribution. */
export { fQuantile } from './f-quantile'
/** CDF of the noncentral t. */
export { noncentralTCdf } from './noncentral-t-cdf'

// ── Errors and versions
export { EngineInputError } from './engine-input-error'
export { ENGINE_VERSION } from './engine-version'
