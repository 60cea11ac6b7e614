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
}

/** A numeric column, one value per row. */
export interface NumericColumn {
  name: string
  values: Float64Array
}

export interface Warning {
  /** Stable code, SCREAMING_SNAKE, ours. */
  code: string
  /** Plain-language message for a bench scientist. */
  message: string
}

/** One random-intercept level of a nested design, its units keyed by their full path. */
export interface RandomLevel {
  /** Level name as given (e.g. "animal"), or "<level>:condition" for a level the engine added. */
  name: string
  nUnits: number
  /** For each kept observation, the index of its unit at this level. */
  unitOfObs: Int32Array
  /** For each unit, the index of its parent unit in the previous (outer) level; -1 at the outermost level. */
  parentOfUnit: Int32Array
  /** Full-path label of each unit, parts joined by "/" (e.g. "A/3"). */
  unitLabels: string[]
  /** True for the unit × condition level added because the condition varies inside units. */
  inserted: boolean
}

/** The condition as a fixed effect: treatment coding against `reference` (= labels[0]). */
export interface ConditionCoding {
  name: string
  /** Reference first, then the others in the order of the input factor's labels. */
  labels: string[]
  reference: string
  /** For each kept observation, an index into `labels`. */
  codes: Int32Array
}

/** A nested design ready for fitting: complete rows only, units keyed by path, condition coded. */
export interface NestedDesign {
  responseName: string
  nObs: number
  /** Response of each kept observation (the input's own column when no row was dropped; never modified). */
  y: Float64Array
  /** The given level names, outermost first. */
  levelNames: string[]
  /** Random levels outermost first, including an inserted "<level>:condition" level. */
  randomLevels: RandomLevel[]
  condition: ConditionCoding | null
  /** Outermost given level whose units each carry a single condition (null: none does, or no condition). */
  conditionLevel: string | null
  /** Per level (only those affected): labels that occur under more than one parent unit. */
  implicitNesting: { level: string; labels: string[] }[]
  /** Rows left out because the response was missing (NaN). */
  nDropped: number
}

/** A variance component of a nested mixed model; `level` is 'residual' for σ². */
export interface VarianceComponent {
  level: string
  variance: number
}

/** REML fit of a nested random-intercept model with a condition fixed effect. */
export interface NestedFit {
  /** Fixed effects: intercept (reference mean), then one effect per non-reference condition. */
  beta: number[]
  betaNames: string[]
  /** Covariance of beta: σ² (Xᵀ H⁻¹ X)⁻¹. */
  vcovBeta: number[][]
  /** Residual variance σ². */
  sigma2: number
  /** Random levels outermost first, then { level: 'residual' }. */
  components: VarianceComponent[]
  /** Variance ratios θ_l = σ_l² / σ², one per random level, outermost first. */
  theta: number[]
  /** True when any random-level variance is estimated as exactly 0 (boundary fit). */
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
