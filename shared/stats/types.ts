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
  /** Optional fixed-effect condition (treatment, genotype, dose). */
  condition?: Factor | null
}

export interface Warning {
  /** Stable code, SCREAMING_SNAKE, ours. */
  code: string
  /** Plain-language message for a bench scientist. */
  message: string
}
