/**
 * Types shared across the statistics engine. The engine never sees CSV or HTTP: callers hand it columns.
 */

/** A categorical column stored as integer codes into a label list (compact for a million rows). */
export interface Factor {
  name: string
  /** One code per row, an index into `labels`. */
  codes: Int32Array
  labels: string[]
}

/** A numeric column, one value per row. */
export interface NumericColumn {
  name: string
  values: Float64Array
}

/** The columns of one analysis as read from a table, before units are keyed by their full path. */
export interface NestedColumns {
  responseName: string
  /** One value per row; NaN marks a missing value (the row is left out and counted). */
  response: Float64Array
  /** Nesting levels, outermost first (e.g. lab, animal). Labels may repeat under different parents. */
  levels: Factor[]
  /** Fixed-effect condition factors (treatment, genotype, dose): none, one, or two (fitted as A * B). */
  factors?: Factor[]
  /** Numeric covariates (NaN marks a missing value: the row is left out and counted). */
  covariates?: NumericColumn[]
  /**
   * The response's distribution: 'gaussian' (default), 'binomial' (the response holds 0/1, or
   * successes with `trials` beside it) or 'poisson' (counts).
   */
  family?: 'gaussian' | 'binomial' | 'poisson'
  /** Binomial only: trials per row (the response then holds successes); absent: one trial per row. */
  trials?: Float64Array | null
  /** The trials column's name (for the model's formula). */
  trialsName?: string
}

export interface Warning {
  /** Stable code, SCREAMING_SNAKE, ours. */
  code: string
  /** Plain-language message for a bench scientist. */
  message: string
}

/** One given nesting level, its units keyed by their full path. */
export interface RandomLevel {
  /** Level name as given (e.g. "animal"). */
  name: string
  nUnits: number
  /** For each kept observation, the index of its unit at this level. */
  unitOfObs: Int32Array
  /** For each unit, the index of its parent unit in the previous (outer) level; -1 at the outermost level. */
  parentOfUnit: Int32Array
  /** Full-path label of each unit, parts joined by "/" (e.g. "A/3"). */
  unitLabels: string[]
}

/** A condition factor as a fixed effect: treatment coding against `reference` (= labels[0]). */
export interface FactorCoding {
  name: string
  /** Reference first, then the others in the order of the input factor's labels. */
  labels: string[]
  reference: string
  /** For each kept observation, an index into `labels`. */
  codes: Int32Array
  /** Index of the outermost given level whose units each hold one label of this factor; -1 when none does. */
  carrier: number
}

/**
 * The design cells: every combination of the factors' labels (one factor: its labels; none: one
 * cell). Cell c of two factors A, B has codes [c / kB, c % kB]; its label is "a:b".
 */
export interface DesignCells {
  labels: string[]
  /** Per cell, its code in each factor. */
  levelsOf: number[][]
  /** For each kept observation, its cell. */
  codes: Int32Array
  /** Observations per cell. */
  counts: number[]
}

/** A numeric covariate of the kept observations. */
export interface CovariateColumn {
  name: string
  values: Float64Array
  mean: number
  /** Sample SD (n − 1). */
  sd: number
  /** Index of the outermost given level within whose units it is constant; -1 when it varies per observation. */
  constantWithin: number
}

/**
 * One random intercept of the model: the units of a given level, or (for a level × factor term)
 * each unit split by the labels of one or two factors.
 */
export interface RandomTerm {
  /** "animal", or "<level>:<factor>" ("lab:treatment", "lab:genotype:treatment"). */
  name: string
  /** The columns whose combination forms the groups, units keyed by their path (["lab", "animal"], ["lab", "treatment"]). */
  grouping: string[]
  /** Index of the given level. */
  level: number
  /** Indices of the factors crossed with the level; empty for the level itself. */
  factors: number[]
  nGroups: number
}

/** A level × factor term left out because its groups are those of another term or of the observations. */
export interface SkippedTerm {
  name: string
  sameAs: string
}

/** What one fixed-effect column (coefficient) is, in treatment coding. */
export interface FixedColumn {
  /** "(intercept)", a factor's name, a covariate's name, or "A:B". */
  term: string
  /** The non-reference label ("a", or "a:b" for an interaction); null for the intercept and covariates. */
  level: string | null
}

/** The fixed part: intercept, factor dummies, covariates, interaction dummies (R's model.matrix order). */
export interface FixedLayout {
  columns: FixedColumn[]
  /** The model terms in order ("A", "B", covariates, "A:B") with their column indices. */
  terms: { term: string; columns: number[] }[]
  /** Per design cell, its row of X with every covariate at 0 (nCells × p, row-major). */
  cellRows: Float64Array
  /** Column index of each covariate, in the order of `covariates`. */
  covariateColumns: number[]
}

/** A nested design ready for fitting: complete rows only, units keyed by path, factors coded. */
export interface NestedDesign {
  responseName: string
  nObs: number
  /** Response of each kept observation (the input's own column when no row was dropped; never modified). */
  y: Float64Array
  /** The given levels, outermost first. */
  randomLevels: RandomLevel[]
  factors: FactorCoding[]
  cells: DesignCells
  covariates: CovariateColumn[]
  /** The random intercepts of the maximal nested model, outermost level first; a level's own term before its level × factor terms. */
  terms: RandomTerm[]
  skippedTerms: SkippedTerm[]
  fixed: FixedLayout
  /** Index of the outermost given level whose units each hold a single design cell; -1 when none does (or no factor). */
  cellLevel: number
  /** Per level (only those affected): labels that occur under more than one parent unit. */
  implicitNesting: { level: string; labels: string[] }[]
  /** Rows left out because the response or a covariate was missing (NaN). */
  nDropped: number
  /** Input row of each kept observation; null when no row was left out (observation i is row i). */
  rowOfObs: Int32Array | null
}

/** An estimate with its standard error, the df of its t distribution and its confidence interval [low, high]. */
export interface Interval {
  estimate: number
  se: number
  df: number
  ci: [number, number]
}

/** A variance component of a nested mixed model; `level` is the term's name, or 'residual' for σ². */
export interface VarianceComponent {
  level: string
  variance: number
}

/** REML fit of the maximal nested random-intercept model. */
export interface NestedFit {
  /** Fixed effects in the order of the design's fixed columns. */
  beta: number[]
  /** Covariance of beta: σ² (Xᵀ H⁻¹ X)⁻¹. */
  vcovBeta: number[][]
  /** Residual variance σ². */
  sigma2: number
  /** One per random term (in the design's order), then { level: 'residual' }. */
  components: VarianceComponent[]
  /** Variance ratios θ_t = σ_t² / σ², one per random term. */
  theta: number[]
  /** True when any random-term variance is estimated as exactly 0 (boundary fit). */
  singular: boolean
  /** −2 × restricted log-likelihood at the optimum (same scale as lme4's REML criterion). */
  remlCriterion: number
  converged: boolean
  /** Number of optimiser iterations (Newton steps) used. */
  iterations: number
  nObs: number
  /** Number of fixed effects p (rank of X). */
  nFixed: number
}
