import type { Warning } from '../stats/types'

/** Facts about one analysis that the warnings are decided on; plain data so they can be tested alone. */
export interface WarningFacts {
  responseName: string
  /** Given nesting levels, outer → inner, with the number of observations in each unit. */
  levels: { name: string; unitSizes: ArrayLike<number>; childrenPerUnit: ArrayLike<number> | null }[]
  condition: {
    /** The condition column, or "A:B" for two factors (conditions are then the design cells). */
    name: string
    /** Outermost level whose units each carry one condition; null when the condition varies within the innermost units. */
    level: string | null
    /** Units at `level` per condition (empty when `level` is null). */
    unitsPerCondition: { condition: string; nUnits: number }[]
    /** Conditions whose observations all have the same value. */
    constantConditions: string[]
  } | null
  /** Each condition factor and the outermost level whose units each carry one of its labels (null: none). */
  factors: { name: string; carrier: string | null }[]
  /** Each level × factor term: the level's units the variance of the effect is estimated from. */
  levelEffects: {
    term: string
    level: string
    factor: string
    nLabels: number
    nUnits: number
    variance: number
  }[]
  /** Why the test on unit means is missing (null when it is shown or there is no condition). */
  unitMeansProblem: string | null
  /** Random levels (including an added "<level>:condition") whose variance was estimated as 0. */
  zeroVarianceLevels: string[]
  implicitNesting: { level: string; labels: string[] }[]
  nDropped: number
  /** A naive test (every observation independent) is part of the result. */
  naiveShown: boolean
  converged: boolean
  /** Binary and count responses: the family, the counts' Pearson χ²/df, and design cells at 0 % or 100 %. */
  family?: 'gaussian' | 'binomial' | 'poisson'
  overdispersion?: { ratio: number; hasObservationLevel: boolean } | null
  edgeCells?: string[]
}

/** Pearson χ²/df of a count model above this is called overdispersed: a rule of thumb (Bolker et al. 2009, Trends Ecol Evol 24:127). */
export const OVERDISPERSION_RATIO = 1.5

/** Fewer units per condition than this: common practice, no source (a t-test on 2 vs 2 units has 2 df). */
export const MIN_UNITS_PER_CONDITION = 3
/** Fewer outermost units than this give a poorly determined top-level variance: common practice, no source. */
export const MIN_OUTER_UNITS = 5
/**
 * Unit sizes count as extremely unbalanced when their coefficient of variation exceeds 1 (SD larger
 * than the mean): at that point the unequal-size design effect counts each unit as if it were twice
 * its mean size ((cv² + 1) m̄ with cv = 1, Eldridge, Ashby & Kerry 2006). The cut-off itself is
 * common practice, no source.
 */
export const UNBALANCED_CV = 1

const MAX_EXAMPLES = 3

/**
 * The warnings of an analysis, in a fixed order, each with a stable code (ours) and a message a
 * bench scientist can act on. Codes: ROWS_DROPPED, NO_VARIATION, IMPLICIT_NESTING,
 * SINGLE_OBSERVATION_UNITS, SINGLE_CHILD_UNITS, UNBALANCED_UNITS, FEW_OUTER_UNITS, FEW_UNITS,
 * CONDITION_CONFOUNDED, LEVEL_EFFECT_FEW_UNITS, UNIT_MEANS_UNAVAILABLE, BOUNDARY_FIT,
 * NOT_CONVERGED, OVERDISPERSED, EDGE_CELLS, NAIVE_TEST_INVALID.
 *
 * @example
 * buildWarnings({ ...facts, nDropped: 2 })
 * // → [{ code: 'ROWS_DROPPED', message: '2 rows were left out because a value was missing …' }]
 */
export function buildWarnings(facts: WarningFacts): Warning[] {
  const warnings: Warning[] = []
  const add = (code: string, message: string) => warnings.push({ code, message })
  const condition = facts.condition

  if (facts.nDropped > 0) {
    add(
      'ROWS_DROPPED',
      `${plural(facts.nDropped, 'row was', 'rows were')} left out because the response or a label was missing.`,
    )
  }

  if (condition && condition.constantConditions.length > 0) {
    add(
      'NO_VARIATION',
      `Every observation of "${facts.responseName}" under ${quoteList(condition.constantConditions)} has the same value. ` +
        'Check that the column holds measurements, not a copy of a label or a placeholder.',
    )
  }

  for (const { level, labels } of facts.implicitNesting) {
    const parent = parentOf(facts, level)
    add(
      'IMPLICIT_NESTING',
      `The ${level} labels ${examples(labels)} occur in more than one ${parent ?? 'parent unit'}. ` +
        `Nestwise treats them as different ${level} units (${parent ?? 'parent'} A/${labels[0]} is not ${parent ?? 'parent'} B/${labels[0]}). ` +
        'If they are really the same units, give them labels that are unique across the whole table.',
    )
  }

  const innermost = facts.levels[facts.levels.length - 1]
  // In a binary or count model a level of single observations is an observation-level term on purpose.
  const observationLevel =
    facts.family !== undefined &&
    facts.family !== 'gaussian' &&
    innermost &&
    countBelow(innermost.unitSizes, 2) === innermost.unitSizes.length
  if (innermost && !observationLevel) {
    const singles = countBelow(innermost.unitSizes, 2)
    if (singles > 0) {
      add(
        'SINGLE_OBSERVATION_UNITS',
        `${singles} of ${innermost.unitSizes.length} ${innermost.name} units have a single observation. ` +
          `They count towards the means but say nothing about the spread within a single ${innermost.name}.`,
      )
    }
  }
  for (const level of facts.levels.slice(0, -1)) {
    const singles = level.childrenPerUnit ? countBelow(level.childrenPerUnit, 2) : 0
    if (singles > 0) {
      const child = facts.levels[facts.levels.indexOf(level) + 1].name
      add(
        'SINGLE_CHILD_UNITS',
        `${singles} of ${level.childrenPerUnit!.length} ${level.name} units hold a single ${child}. ` +
          `In those, ${level.name} and ${child} differences cannot be told apart.`,
      )
    }
  }

  for (const level of facts.levels) {
    const { cv, min, max } = sizeSpread(level.unitSizes)
    if (cv > UNBALANCED_CV) {
      add(
        'UNBALANCED_UNITS',
        `The number of observations per ${level.name} is very uneven (from ${min} to ${max}; coefficient of variation ${cv.toFixed(2)}, above ${UNBALANCED_CV}). ` +
          `Large ${level.name} units weigh heavily in a plain mean; the mixed model and the design effect allow for this, the naive numbers do not.`,
      )
    }
  }

  const outer = facts.levels[0]
  if (outer && outer.unitSizes.length < MIN_OUTER_UNITS && facts.levels.length > 1) {
    add(
      'FEW_OUTER_UNITS',
      `There are only ${outer.unitSizes.length} ${outer.name} units. The variance between ${outer.name} units is estimated from ` +
        `so few values that it is very uncertain; fewer than ${MIN_OUTER_UNITS} is commonly considered too few.`,
    )
  }

  if (condition && condition.level) {
    const thin = condition.unitsPerCondition.filter((c) => c.nUnits < MIN_UNITS_PER_CONDITION)
    if (thin.length > 0) {
      add(
        'FEW_UNITS',
        `${thin.map((c) => `"${c.condition}" has ${plural(c.nUnits, condition.level + ' unit', condition.level + ' units')}`).join('; ')}. ` +
          `The condition is assigned per ${condition.level}, so each ${condition.level} counts once in the comparison; ` +
          `with fewer than ${MIN_UNITS_PER_CONDITION} per condition the comparison has very little power and its p-value is fragile.`,
      )
    }
  }
  const outerName = outer?.name
  for (const factor of facts.factors) {
    if (facts.levels.length > 1 && factor.carrier === outerName) {
      add(
        'CONDITION_CONFOUNDED',
        `Every ${outerName} ran a single ${factor.name}, so ${factor.name} differences cannot be separated from ` +
          `${outerName}-to-${outerName} differences. The comparison rests on ${outer.unitSizes.length} ${outerName} units, ` +
          `not on the ${facts.levels
            .slice(1)
            .map((l) => l.name)
            .join(' or ')} units inside them.`,
      )
    }
  }

  const wald = facts.family !== undefined && facts.family !== 'gaussian'
  for (const effect of facts.levelEffects) {
    if (effect.nUnits >= MIN_OUTER_UNITS) continue
    const spread = wald
      ? // A Wald z test treats the SE as known: no degrees of freedom widen the interval for few units.
        `The ${effect.factor} comparison is judged against how much the effect differs between ${effect.level} units, ` +
        `and a binary or count model's z test does not widen its interval for having so few of them: ` +
        'its interval is likely too narrow and its p-value too small.'
      : effect.variance > 0
        ? `The ${effect.factor} comparison is judged against how much the effect differs between ${effect.level} units, ` +
          `which leaves it about ${(effect.nUnits - 1) * (effect.nLabels - 1)} degrees of freedom ((${effect.level} units − 1) × (${effect.factor} labels − 1)): ` +
          'its interval is wide and its p-value fragile.'
        : `That variance was estimated as 0 here, but with so few ${effect.level} units a real difference between them can go unseen, ` +
          `and the comparison's degrees of freedom may then be too optimistic.`
    add(
      'LEVEL_EFFECT_FEW_UNITS',
      `The ${effect.factor} effect may differ from one ${effect.level} to the next (the "${effect.term}" variance), and only ` +
        `${effect.nUnits} ${effect.level} units show how much. ${spread} Fewer than ${MIN_OUTER_UNITS} is commonly considered too few.`,
    )
  }

  if (condition && facts.unitMeansProblem) {
    add(
      'UNIT_MEANS_UNAVAILABLE',
      `The test on unit means is not shown: ${facts.unitMeansProblem.replace(/\.$/, '')}. The mixed-model comparison does not need it.`,
    )
  }

  if (facts.zeroVarianceLevels.length > 0) {
    const names = facts.zeroVarianceLevels
    add(
      'BOUNDARY_FIT',
      `The variance between ${quoteList(names)} units was estimated as 0 (a boundary fit). That is a valid result, not a failure: ` +
        `the data show no extra spread at ${names.length === 1 ? 'that level' : 'those levels'} beyond what the inner levels explain. ` +
        'With few units, real but small differences can look like 0.',
    )
  }

  if (!facts.converged) {
    add(
      'NOT_CONVERGED',
      'The model fit stopped before it fully converged. The estimates are the best found, but check them against another tool.',
    )
  }

  const over = facts.overdispersion
  if (over && over.ratio > OVERDISPERSION_RATIO && !over.hasObservationLevel) {
    add(
      'OVERDISPERSED',
      `The counts vary more than a Poisson model allows (Pearson χ²/df = ${over.ratio.toFixed(2)}, above ${OVERDISPERSION_RATIO}), ` +
        'so the standard errors and p-values are too optimistic. Add a nesting level with one row per observation (the cell or neuron id): ' +
        'its term then absorbs the extra spread (an observation-level random effect, Harrison 2014, PeerJ 2:e616). ' +
        'If that does not settle it, consult a statistician about a negative binomial model.',
    )
  }

  if (facts.edgeCells && facts.edgeCells.length > 0) {
    const what =
      facts.family === 'poisson'
        ? 'has no counts at all'
        : 'has every observation the same (all yes or all no)'
    add(
      'EDGE_CELLS',
      `${quoteList(facts.edgeCells)} ${what}. The model's estimate there rests on its assumptions more than on the data, ` +
        'and its ratio and interval can be extreme; read those comparisons with care.',
    )
  }

  if (facts.naiveShown) {
    add(
      'NAIVE_TEST_INVALID',
      'The naive test treats every observation as independent. Observations that share a unit are correlated, so its standard ' +
        'errors are too small and its p-value too optimistic. It is shown only to show the size of that mistake.',
    )
  }

  return warnings
}

function parentOf(facts: WarningFacts, level: string): string | null {
  const index = facts.levels.findIndex((l) => l.name === level)
  return index > 0 ? facts.levels[index - 1].name : null
}

function countBelow(values: ArrayLike<number>, limit: number): number {
  let count = 0
  for (let i = 0; i < values.length; i++) if (values[i] < limit) count++
  return count
}

function sizeSpread(sizes: ArrayLike<number>): { cv: number; min: number; max: number } {
  const k = sizes.length
  if (k === 0) return { cv: 0, min: 0, max: 0 }
  let sum = 0
  let min = Infinity
  let max = -Infinity
  for (let i = 0; i < k; i++) {
    sum += sizes[i]
    if (sizes[i] < min) min = sizes[i]
    if (sizes[i] > max) max = sizes[i]
  }
  const mean = sum / k
  let squares = 0
  for (let i = 0; i < k; i++) squares += (sizes[i] - mean) ** 2
  // SD with divisor k, as in the design-effect formulas.
  return { cv: Math.sqrt(squares / k) / mean, min, max }
}

function plural(n: number, one: string, many: string): string {
  return `${n} ${n === 1 ? one : many}`
}

function quoteList(names: string[]): string {
  return names.map((n) => `"${n}"`).join(', ')
}

function examples(labels: string[]): string {
  const shown = labels
    .slice(0, MAX_EXAMPLES)
    .map((l) => `"${l}"`)
    .join(', ')
  return labels.length > MAX_EXAMPLES ? `${shown} (and ${labels.length - MAX_EXAMPLES} more)` : shown
}
