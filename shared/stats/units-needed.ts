import { EngineInputError } from './engine-input-error'
import { clusterPower } from './cluster-power'
import type { TotalSpread } from './total-variance'

export interface UnitsNeededInput extends TotalSpread {
  /** Observations per unit, m. */
  obsPerUnit: number
  /** Difference between the arm means to detect, δ. */
  difference: number
  /** Intraclass correlation ρ, between 0 and 1. */
  icc: number
  /** Two-sided significance level, default 0.05. */
  alpha?: number
  /** Target power, default 0.8. */
  power?: number
}

export interface UnitsNeededResult {
  /** Continuous k at which the power equals the target (2 when even 2 units per arm exceed it). */
  exact: number
  /** Whole units per arm: ceil(exact), at least 2. */
  unitsPerArm: number
  /** Power with `unitsPerArm` units per arm. */
  achievedPower: number
  /** True when 2 units per arm (the minimum for a variance estimate) already exceed the target. */
  atMinimum: boolean
}

/** No plan asks for more units than this; beyond it the inputs are almost certainly wrong. */
const MAX_UNITS = 1e7

/**
 * Units per arm needed for a two-arm comparison of unit means to reach a target power: the
 * smallest k with clusterPower(k, m, δ, σ, ρ, α) ≥ target, found by root finding on the
 * continuous k (bracketing, then the Illinois variant of regula falsi to 1e-9) and rounded up.
 *
 * Formula: solve power(k) = target with power(k) from clusterPower (noncentral t with
 * 2(k − 1) df, λ = √(k m / (2 deff)) · |δ| / σ_total, deff = 1 + (m − 1)ρ). Source: as
 * clusterPower; the worked example in the documentation of the R package clusterPower
 * (crtpwr.2mean: m = 10, δ = 1, ρ = 0.1, σ² = 5, α = 0.05, power 0.8 → 15.93 → 16 per arm).
 *
 * Guard errors: those of clusterPower, a target power outside (α, 1), a target that needs more
 * than 10⁷ units per arm.
 *
 * @example
 * unitsNeeded({ obsPerUnit: 10, difference: 1, variance: 5, icc: 0.1, alpha: 0.05, power: 0.8 })
 * // → { exact: 15.9327, unitsPerArm: 16, achievedPower: 0.8018, atMinimum: false }
 */
export function unitsNeeded(input: UnitsNeededInput): UnitsNeededResult {
  const target = input?.power ?? 0.8
  const alpha = input?.alpha ?? 0.05
  if (typeof target !== 'number' || !(target > alpha && target < 1)) {
    throw new EngineInputError(
      `unitsNeeded: the target power must be between alpha (${alpha}) and 1, got ${target}`,
    )
  }
  const powerAt = (k: number) => clusterPower({ ...input, unitsPerArm: k, alpha }).power
  const atTwo = powerAt(2)
  if (atTwo >= target) {
    return { exact: 2, unitsPerArm: 2, achievedPower: atTwo, atMinimum: true }
  }
  let low = 2
  let lowGap = atTwo - target
  let high = 4
  let highGap = powerAt(high) - target
  while (highGap < 0) {
    low = high
    lowGap = highGap
    high *= 2
    if (high > MAX_UNITS) {
      throw new EngineInputError(
        'unitsNeeded: the target power needs more than 10 million units per arm; check the difference, spread and ICC',
      )
    }
    highGap = powerAt(high) - target
  }
  // Illinois regula falsi: keeps the bracket, converges superlinearly on this smooth monotone curve.
  let side = 0
  let exact = high
  for (let iteration = 0; iteration < 200 && high - low > 1e-9; iteration++) {
    exact = (low * highGap - high * lowGap) / (highGap - lowGap)
    const gap = powerAt(exact) - target
    if (gap === 0) {
      low = high = exact
      break
    }
    if (gap < 0) {
      low = exact
      lowGap = gap
      if (side === -1) highGap /= 2
      side = -1
    } else {
      high = exact
      highGap = gap
      if (side === 1) lowGap /= 2
      side = 1
    }
  }
  exact = (low + high) / 2
  const unitsPerArm = Math.max(2, Math.ceil(exact - 1e-9))
  return { exact, unitsPerArm, achievedPower: powerAt(unitsPerArm), atMinimum: false }
}
