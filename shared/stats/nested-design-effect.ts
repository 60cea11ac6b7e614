import { EngineInputError } from './engine-input-error'
import { unitSizeSummary } from './unit-size-summary'

export interface NestedDesignEffectLevel {
  /** Observations per unit at this level (e.g. cells per animal for the animal level). */
  unitSizes: number[]
  /** This level's share of the total variance, σ_l² / σ_total², between 0 and 1. */
  share: number
}

export interface NestedDesignEffectTerm {
  meanSize: number
  cv: number
  /** ((cv² + 1) m̄ − 1) · share: this level's contribution to the design effect. */
  term: number
}

export interface NestedDesignEffectResult {
  /** 1 + Σ of the per-level terms. */
  deff: number
  /** One entry per input level, in the same order. */
  terms: NestedDesignEffectTerm[]
}

/**
 * Design effect of a mean over observations nested in several levels of units (lab ⊃ animal ⊃
 * cell): each level whose units share a random effect adds its own inflation term.
 *
 * Formula: deff = 1 + Σ_l ((cv_l² + 1) m̄_l − 1) ρ_l, where m̄_l and cv_l describe the number of
 * observations per unit of level l and ρ_l = σ_l² / σ_total² is that level's variance share.
 * For balanced data this is exact: Var(ȳ) = Σ_l σ_l² / k_l + σ² / N gives
 * N · Var(ȳ) / σ_total² = 1 + Σ_l (m_l − 1) ρ_l. The unequal-size factor per level follows
 * Eldridge, Ashby & Kerry (2006), Int J Epidemiol 35:1292 (summing the per-level terms is the
 * usual multilevel extension, an approximation when sizes vary).
 *
 * Guard errors: no levels, a level without unit sizes, a size that is not positive, a share
 * outside [0, 1], shares that add up to more than 1.
 *
 * @example
 * nestedDesignEffect([
 *   { unitSizes: [100, 100], share: 0.1 },           // 2 labs of 100 cells
 *   { unitSizes: [10, 10, 10, 10, 10, 10, 10, 10, 10, 10, 10, 10, 10, 10, 10, 10, 10, 10, 10, 10], share: 0.2 }, // 20 animals of 10 cells
 * ])
 * // → { deff: 1 + 99·0.1 + 9·0.2 = 12.7, terms: [{ term: 9.9, … }, { term: 1.8, … }] }
 */
export function nestedDesignEffect(levels: NestedDesignEffectLevel[]): NestedDesignEffectResult {
  if (!Array.isArray(levels) || levels.length === 0) {
    throw new EngineInputError('nestedDesignEffect requires at least one level')
  }
  let shareSum = 0
  const terms = levels.map((level, index) => {
    const share = level?.share
    if (typeof share !== 'number' || !(share >= 0 && share <= 1)) {
      throw new EngineInputError(
        `nestedDesignEffect: the share of level ${index + 1} must be between 0 and 1, got ${share}`,
      )
    }
    shareSum += share
    const { meanSize, cv } = unitSizeSummary(level.unitSizes, `nestedDesignEffect (level ${index + 1})`)
    return { meanSize, cv, term: ((cv * cv + 1) * meanSize - 1) * share }
  })
  // A little slack for shares computed in floating point.
  if (shareSum > 1 + 1e-9) {
    throw new EngineInputError(`nestedDesignEffect: the level shares add up to ${shareSum}, more than 1`)
  }
  return { deff: 1 + terms.reduce((sum, t) => sum + t.term, 0), terms }
}
