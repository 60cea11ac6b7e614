import type { AnalysisResult, EffectVariation, LevelIcc } from '../schemas/analysis-result'
import { nestedDesignEffect } from '../stats/nested-design-effect'
import type { NestedDesign, RandomTerm } from '../stats/types'

/** Observations in each group of a random term (a level's units, or its units split by a factor's labels). */
export function termGroupSizes(design: NestedDesign, term: RandomTerm): number[] {
  const level = design.randomLevels[term.level]
  if (term.factors.length === 0) return countBy(level.unitOfObs, level.nUnits)
  const width = design.cells.labels.length
  const keys = new Int32Array(design.nObs)
  const projection = design.cells.levelsOf.map((codes) => term.factors.map((f) => codes[f]).join(','))
  const distinct = [...new Set(projection)]
  const index = new Map(distinct.map((p, i) => [p, i]))
  for (let i = 0; i < design.nObs; i++) {
    keys[i] = level.unitOfObs[i] * width + index.get(projection[design.cells.codes[i]])!
  }
  return countBy(keys, level.nUnits * width).filter((n) => n > 0)
}

function countBy(keys: Int32Array, n: number): number[] {
  const counts = new Float64Array(n)
  for (let i = 0; i < keys.length; i++) counts[keys[i]]++
  return Array.from(counts)
}

/** True when every group of `inner` lies inside one group of `outer` (its labels of outer's factors are constant there). */
export function termContains(design: NestedDesign, outer: RandomTerm, inner: RandomTerm): boolean {
  if (outer.level > inner.level) return false
  return outer.factors.every(
    (f) => inner.factors.includes(f) || constantWithin(design.factors[f].carrier, inner.level),
  )
}

function constantWithin(carrier: number, level: number): boolean {
  return carrier !== -1 && carrier <= level
}

/**
 * ICC of each random term: the correlation of two observations that share the term's group,
 * i.e. the variance shares of every term whose groups contain that group, summed (for purely
 * nested terms: this level and all above).
 */
export function termIccs(
  design: NestedDesign,
  shares: number[],
  oneWayCi: [number, number] | null,
): LevelIcc[] {
  return design.terms.map((term) => {
    const icc = design.terms.reduce(
      (s, other, t) => s + (termContains(design, other, term) ? shares[t] : 0),
      0,
    )
    return {
      level: term.name,
      icc: Math.min(1, Math.max(0, icc)),
      ciLow: oneWayCi ? oneWayCi[0] : null,
      ciHigh: oneWayCi ? oneWayCi[1] : null,
      ciMethod: oneWayCi ? ('one-way-f' as const) : null,
    }
  })
}

/**
 * For each level × factor term: how much the factor's effect differs between that level's units.
 * With a random intercept per (unit, label), the unit-specific difference between two labels has
 * variance 2σ², so its SD is √(2σ²).
 */
export function effectVariation(design: NestedDesign, variances: number[]): EffectVariation[] {
  return design.terms.flatMap((term, t) => {
    if (term.factors.length !== 1) return []
    const level = design.randomLevels[term.level]
    return [
      {
        term: term.name,
        level: level.name,
        factor: design.factors[term.factors[0]].name,
        variance: variances[t],
        effectSd: Math.sqrt(2 * variances[t]),
        nUnits: level.nUnits,
      },
    ]
  })
}

/**
 * The design effect of the mean of all observations (Kish: 1 + Σ (mean group size − 1) · share,
 * over the random terms) and each term's part in it, from the terms' variance shares.
 */
export function tableDesignEffects(
  design: NestedDesign,
  randomShares: number[],
): Pick<AnalysisResult, 'designEffectKish' | 'designEffectTerms'> {
  const termSizes = design.terms.map((term) => termGroupSizes(design, term))
  const table = nestedDesignEffect(termSizes.map((unitSizes, t) => ({ unitSizes, share: randomShares[t] })))
  return {
    designEffectKish: 1 + table.terms.reduce((sum, t, i) => sum + (t.meanSize - 1) * randomShares[i], 0),
    designEffectTerms: design.terms.map((term, t) => ({
      level: term.name,
      meanUnitSize: table.terms[t].meanSize,
      unitSizeCv: table.terms[t].cv,
      share: randomShares[t],
      term: table.terms[t].term,
    })),
  }
}
