import { EngineInputError } from './engine-input-error'
import { clusterPower } from './cluster-power'
import { costOptimalObsPerUnit } from './cost-optimal-obs-per-unit'
import { normalQuantile } from './normal-quantile'
import { totalVariance, type TotalSpread } from './total-variance'
import { unitsNeeded } from './units-needed'

export interface PlanDesignInput extends TotalSpread {
  /** Intraclass correlation ρ of the units that are assigned to arms (e.g. animals). */
  icc: number
  /** Smallest difference between two arm means worth detecting, δ. */
  difference: number
  /** Two-sided family-wise significance level, default 0.05. */
  alpha?: number
  /** Target power of each pairwise comparison, default 0.8. */
  power?: number
  /** Cost of one unit (animal, culture), any currency or effort scale. */
  costPerUnit: number
  /** Cost of one observation inside a unit (cell), same scale. */
  costPerObs: number
  /** Upper limit on units per arm (e.g. animals available). */
  maxUnitsPerArm?: number
  /** Upper limit on observations per unit (e.g. cells that can be imaged per animal). */
  maxObsPerUnit?: number
  /** Number of arms (conditions), default 2. */
  arms?: number
}

export interface PlanDesignResult {
  /** False when no design within the limits reaches the target power (the most powerful one is reported). */
  feasible: boolean
  unitsPerArm: number
  obsPerUnit: number
  arms: number
  totalUnits: number
  totalObs: number
  /** arms · k · (c_unit + m · c_obs). */
  cost: number
  /** Power of each pairwise comparison at `alphaPerComparison`. */
  achievedPower: number
  /** α / (number of pairs) for more than two arms (Bonferroni), else α. */
  alphaPerComparison: number
  /** Design effect 1 + (m − 1)ρ of the recommended design. */
  deff: number
  /** Cost-optimal observations per unit m* ignoring whole numbers and degrees of freedom; null when there is no finite optimum (ICC 0). */
  mStar: number | null
  /** Largest observations per unit that was searched. */
  searchedUpToObsPerUnit: number
  /** Plain-language remarks (limits that bind, no finite optimum), possibly empty. */
  notes: string[]
}

/** Without a limit and without a finite optimum (ICC 0), observations per unit are searched up to this. */
const DEFAULT_OBS_CAP = 1000
/** Designs whose normal-approximation cost is within this factor of the cheapest are checked exactly. */
const COST_MARGIN = 1.5
const MAX_EXACT_CANDIDATES = 200

/**
 * Cheapest design (units per arm k, observations per unit m) that reaches the target power for
 * a comparison of arm means when whole units are assigned to arms, within optional limits.
 *
 * Method: for each whole m from 1 to the limit (default: max(4·m*, 20), or 1000 when m* is
 * infinite), the smallest whole k ≥ 2 with clusterPower(k, m) ≥ target is found; the design
 * with the lowest total cost arms · k · (c_unit + m · c_obs) wins (ties: higher power). To keep
 * this fast, a normal-approximation k_z = 2 deff σ² (z_{1−α/2} + z_{power})² / (m δ²) ranks all
 * m first, and only those within 1.5× of the cheapest approximate cost (at most 200) are solved
 * exactly with the noncentral t. m* = √((c_unit/c_obs)(1 − ρ)/ρ) is reported for reference
 * (Raudenbush 1997, Psychol Methods 2:173); the search result can differ from it because k and
 * m are whole numbers and small k costs degrees of freedom.
 *
 * More than two arms: the power is that of each pairwise comparison between two arms with
 * 2(k − 1) degrees of freedom, at a Bonferroni-adjusted level α / (arms(arms − 1)/2). That is
 * conservative for the Holm-adjusted pairwise contrasts the analysis reports (Holm rejects at
 * least what Bonferroni rejects) and for their pooled degrees of freedom; it is not the power of
 * the overall F test.
 *
 * Guard errors: those of clusterPower and costOptimalObsPerUnit; arms not a whole number ≥ 2;
 * limits that are not whole numbers (units ≥ 2, observations ≥ 1); target power outside (α, 1).
 *
 * @example
 * planDesign({ icc: 0.1, variance: 5, difference: 1, costPerUnit: 100, costPerObs: 1 })
 * // → { feasible: true, unitsPerArm: 11, obsPerUnit: 34, cost: 2948, achievedPower: 0.8010, mStar: 30, … }
 */
export function planDesign(input: PlanDesignInput): PlanDesignResult {
  const arms = input?.arms ?? 2
  if (!Number.isInteger(arms) || arms < 2) {
    throw new EngineInputError(`planDesign requires a whole number of at least two arms, got ${arms}`)
  }
  const alpha = input.alpha ?? 0.05
  const target = input.power ?? 0.8
  if (typeof alpha !== 'number' || !(alpha > 0 && alpha < 1)) {
    throw new EngineInputError(`planDesign: alpha must be between 0 and 1, got ${alpha}`)
  }
  if (typeof target !== 'number' || !(target > alpha && target < 1)) {
    throw new EngineInputError(
      `planDesign: the target power must be between alpha (${alpha}) and 1, got ${target}`,
    )
  }
  const { maxUnitsPerArm, maxObsPerUnit } = input
  if (maxUnitsPerArm !== undefined && !(Number.isInteger(maxUnitsPerArm) && maxUnitsPerArm >= 2)) {
    throw new EngineInputError(
      `planDesign: maxUnitsPerArm must be a whole number of at least 2, got ${maxUnitsPerArm}`,
    )
  }
  if (maxObsPerUnit !== undefined && !(Number.isInteger(maxObsPerUnit) && maxObsPerUnit >= 1)) {
    throw new EngineInputError(
      `planDesign: maxObsPerUnit must be a whole number of at least 1, got ${maxObsPerUnit}`,
    )
  }
  const alphaPerComparison = alpha / ((arms * (arms - 1)) / 2)
  const variance = totalVariance(input, 'planDesign')
  const { icc, difference, costPerUnit, costPerObs } = input
  // Validates icc, difference and α through the power function before any search.
  clusterPower({ unitsPerArm: 2, obsPerUnit: 1, difference, variance, icc, alpha: alphaPerComparison })
  const optimum = costOptimalObsPerUnit({ costPerUnit, costPerObs, icc })
  const notes: string[] = []
  if (optimum.note) notes.push(optimum.note)

  const mStar = optimum.exact
  const searchCap =
    maxObsPerUnit ?? (Number.isFinite(mStar) ? Math.max(20, Math.ceil(4 * mStar)) : DEFAULT_OBS_CAP)
  if (maxObsPerUnit === undefined && !Number.isFinite(mStar)) {
    notes.push(
      `Observations per unit were searched up to ${DEFAULT_OBS_CAP}; set a limit to search a different range.`,
    )
  }

  const powerAt = (k: number, m: number) =>
    clusterPower({ unitsPerArm: k, obsPerUnit: m, difference, variance, icc, alpha: alphaPerComparison })
      .power
  const costOf = (k: number, m: number) => arms * k * (costPerUnit + m * costPerObs)
  const z = normalQuantile(1 - alphaPerComparison / 2) + normalQuantile(target)
  const approximateUnits = (m: number) =>
    Math.max(2, (2 * (1 + (m - 1) * icc) * variance * z * z) / (m * difference * difference))

  const ranked: { m: number; cost: number }[] = []
  for (let m = 1; m <= searchCap; m++) ranked.push({ m, cost: costOf(approximateUnits(m), m) })
  ranked.sort((a, b) => a.cost - b.cost)
  const cheapest = ranked[0].cost
  const candidates = ranked.filter((c) => c.cost <= COST_MARGIN * cheapest).slice(0, MAX_EXACT_CANDIDATES)

  let best: { k: number; m: number; power: number; cost: number } | null = null
  for (const { m } of candidates) {
    const k = smallestUnits(
      m,
      Math.ceil(approximateUnits(m)),
      target,
      maxUnitsPerArm,
      powerAt,
      () =>
        unitsNeeded({ obsPerUnit: m, difference, variance, icc, alpha: alphaPerComparison, power: target })
          .unitsPerArm,
    )
    if (k === null) continue
    const cost = costOf(k, m)
    const power = powerAt(k, m)
    if (!best || cost < best.cost - 1e-9 || (Math.abs(cost - best.cost) <= 1e-9 && power > best.power)) {
      best = { k, m, power, cost }
    }
  }

  let feasible = true
  if (!best) {
    // Only reachable with a unit limit: report the most powerful design the limits allow.
    feasible = false
    const k = maxUnitsPerArm as number
    const m = searchCap
    best = { k, m, power: powerAt(k, m), cost: costOf(k, m) }
    notes.push(
      `No design within ${k} units per arm and ${m} observations per unit reaches power ${target}; the most powerful one reaches ${best.power.toFixed(3)}.`,
    )
  } else {
    if (maxUnitsPerArm !== undefined && best.k === maxUnitsPerArm)
      notes.push('The limit on units per arm is binding.')
    if (maxObsPerUnit !== undefined && best.m === maxObsPerUnit)
      notes.push('The limit on observations per unit is binding.')
  }
  if (arms > 2) {
    notes.push(
      `With ${arms} arms the power is that of each pairwise comparison at the Bonferroni level ${alphaPerComparison.toPrecision(3)}.`,
    )
  }

  return {
    feasible,
    unitsPerArm: best.k,
    obsPerUnit: best.m,
    arms,
    totalUnits: arms * best.k,
    totalObs: arms * best.k * best.m,
    cost: best.cost,
    achievedPower: best.power,
    alphaPerComparison,
    deff: 1 + (best.m - 1) * icc,
    mStar: Number.isFinite(mStar) ? mStar : null,
    searchedUpToObsPerUnit: searchCap,
    notes,
  }
}

/**
 * Smallest whole k ≥ 2 (and ≤ limit) with power(k, m) ≥ target, scanning from a starting guess;
 * falls back to root finding when the guess is far off. Null when the limit is too small.
 */
function smallestUnits(
  m: number,
  guess: number,
  target: number,
  limit: number | undefined,
  powerAt: (k: number, m: number) => number,
  solve: () => number,
): number | null {
  const maxSteps = 25
  let k = Math.max(2, limit === undefined ? guess : Math.min(guess, limit))
  if (powerAt(k, m) >= target) {
    for (let step = 0; step < maxSteps; step++) {
      if (k === 2 || powerAt(k - 1, m) < target) return k
      k--
    }
    return Math.min(k, solve())
  }
  for (let step = 0; step < maxSteps; step++) {
    k++
    if (limit !== undefined && k > limit) return null
    if (powerAt(k, m) >= target) return k
  }
  const solved = solve()
  return limit !== undefined && solved > limit ? null : solved
}
