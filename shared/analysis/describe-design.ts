import type {
  AnalysisResult,
  EffectVariation,
  HeadlineQuantity,
  RandomTerm,
} from '../schemas/analysis-result'
import { cellMeanRow } from '../stats/cell-mean-row'
import { observationsPerUnit } from '../stats/observations-per-unit'
import type { NestedDesign } from '../stats/types'
import { unitSizeSummary } from '../stats/unit-size-summary'
import type { WarningFacts } from './build-warnings'

/** Examples of repeated labels kept per level in the result. */
const MAX_LABEL_EXAMPLES = 5

/** The parts of a result that describe the design itself, whatever the response's family. */
export type DesignDescription = Pick<
  AnalysisResult,
  | 'nObs'
  | 'nDropped'
  | 'response'
  | 'condition'
  | 'reference'
  | 'conditionLevel'
  | 'factors'
  | 'covariates'
  | 'levels'
  | 'implicitNesting'
> & { random: RandomTerm[] }

/**
 * The design as the result reports it: observations kept and dropped, the condition (one factor,
 * or "A:B" for two, whose groups are the design cells), the factors with the level carrying each,
 * the covariates, every given level with its units and their sizes, repeated labels, and the
 * random terms of the maximal model.
 *
 * @example
 * describeDesign(design).condition // → 'genotype:treatment'
 */
export function describeDesign(design: NestedDesign): DesignDescription {
  const levelSizes = design.randomLevels.map((level) => observationsPerUnit(level))
  const levelName = (l: number) => (l >= 0 ? design.randomLevels[l].name : null)
  return {
    nObs: design.nObs,
    nDropped: design.nDropped,
    response: design.responseName,
    condition: design.factors.length > 0 ? design.factors.map((f) => f.name).join(':') : null,
    reference: design.factors.length > 0 ? design.factors.map((f) => f.reference).join(':') : null,
    conditionLevel: levelName(design.cellLevel),
    factors: design.factors.map((f) => ({
      name: f.name,
      labels: f.labels,
      reference: f.reference,
      level: levelName(f.carrier),
    })),
    covariates: design.covariates.map((c) => ({
      name: c.name,
      mean: c.mean,
      sd: c.sd,
      level: levelName(c.constantWithin),
    })),
    levels: design.randomLevels.map((level, l) => {
      const { meanSize, cv } = unitSizeSummary(levelSizes[l], 'describeDesign')
      return {
        name: level.name,
        nUnits: level.nUnits,
        minUnitSize: levelSizes[l].reduce((min, size) => Math.min(min, size), Infinity),
        meanUnitSize: meanSize,
        maxUnitSize: levelSizes[l].reduce((max, size) => Math.max(max, size), 0),
        unitSizeCv: cv,
      }
    }),
    implicitNesting: design.implicitNesting.map(({ level, labels }) => ({
      level,
      nRepeatedLabels: labels.length,
      examples: labels.slice(0, MAX_LABEL_EXAMPLES),
    })),
    random: design.terms.map((term) => ({
      name: term.name,
      level: design.randomLevels[term.level].name,
      factor: term.factors.length > 0 ? term.factors.map((f) => design.factors[f].name).join(':') : null,
      nGroups: term.nGroups,
    })),
  }
}

/** The given levels as the warnings see them: observations per unit and children per unit. */
export function levelFacts(design: NestedDesign): WarningFacts['levels'] {
  return design.randomLevels.map((level, l) => ({
    name: level.name,
    unitSizes: observationsPerUnit(level),
    childrenPerUnit:
      l + 1 < design.randomLevels.length
        ? observationsPerUnit({ nUnits: level.nUnits, unitOfObs: design.randomLevels[l + 1].parentOfUnit })
        : null,
  }))
}

/** Units of the level that carries one design cell per unit, counted per cell; null when no level does. */
export function unitsPerCell(design: NestedDesign): number[] | null {
  if (design.cellLevel < 0) return null
  const { unitOfObs, nUnits } = design.randomLevels[design.cellLevel]
  const cellOfUnit = new Int32Array(nUnits)
  for (let i = 0; i < design.nObs; i++) cellOfUnit[unitOfObs[i]] = design.cells.codes[i]
  const counts = new Array<number>(design.cells.labels.length).fill(0)
  for (let u = 0; u < nUnits; u++) counts[cellOfUnit[u]]++
  return counts
}

/**
 * The first factor's first label against its reference, averaged over the second factor's
 * labels (two factors): the quantity the headline describes. Weights on β and its observations.
 */
function firstFactorContrast(design: NestedDesign): {
  label: string
  weights: number[]
  nObs: number
} {
  const [a, b] = design.factors
  const kB = b.labels.length
  const weights = new Array<number>(design.fixed.columns.length).fill(0)
  let nObs = 0
  for (let j = 0; j < kB; j++) {
    const one = cellMeanRow(design, kB + j)
    const ref = cellMeanRow(design, j)
    one.forEach((v, k) => (weights[k] += (v - ref[k]) / kB))
    nObs += design.cells.counts[kB + j] + design.cells.counts[j]
  }
  return { label: `${a.labels[1]} − ${a.labels[0]} (averaged over ${b.name})`, weights, nObs }
}

/**
 * The quantity the headline badges describe: the first comparison of the first factor (its
 * first label against the reference, averaged over the second factor's labels), or the mean
 * without a condition. `designEffectOf` gives the design effect of lᵀβ under the fitted model
 * (REML or GLMM); one factor reuses the first contrast's own.
 */
export function headlineQuantity(
  design: NestedDesign,
  contrasts: readonly { a: string; b: string; designEffect?: number; effectiveN?: number }[],
  designEffectOf: (weights: number[]) => number,
): HeadlineQuantity {
  if (design.factors.length === 0) {
    const deff = designEffectOf(cellMeanRow(design, 0))
    return { label: 'mean', designEffect: deff, effectiveN: design.nObs / deff }
  }
  if (design.factors.length === 1) {
    const first = contrasts[0]
    return {
      label: `${first.a} − ${first.b}`,
      designEffect: first.designEffect!,
      effectiveN: first.effectiveN!,
    }
  }
  const { label, weights, nObs } = firstFactorContrast(design)
  const deff = designEffectOf(weights)
  return { label, designEffect: deff, effectiveN: nObs / deff }
}

/**
 * The warning facts every nested analysis shares (levels, condition, factors, level × condition
 * terms, implicit nesting, dropped rows); the model-specific facts are added by the caller.
 */
export function designWarningFacts(input: {
  design: NestedDesign
  result: Pick<AnalysisResult, 'condition' | 'conditionLevel' | 'factors' | 'groups'>
  variation: EffectVariation[]
  /** Conditions whose observations all have the same value. */
  constantConditions: string[]
}): Pick<
  WarningFacts,
  'responseName' | 'levels' | 'condition' | 'factors' | 'levelEffects' | 'implicitNesting' | 'nDropped'
> {
  const { design, result, variation } = input
  const cellLevel = result.conditionLevel
  return {
    responseName: design.responseName,
    levels: levelFacts(design),
    condition: result.condition
      ? {
          name: result.condition,
          level: cellLevel,
          unitsPerCondition: cellLevel
            ? result.groups.map((g) => ({ condition: g.condition, nUnits: g.nUnits ?? 0 }))
            : [],
          constantConditions: input.constantConditions,
        }
      : null,
    factors: (result.factors ?? []).map((f) => ({ name: f.name, carrier: f.level })),
    levelEffects: variation.map((v) => ({
      ...v,
      nLabels: design.factors.find((f) => f.name === v.factor)!.labels.length,
    })),
    implicitNesting: design.implicitNesting,
    nDropped: design.nDropped,
  }
}
