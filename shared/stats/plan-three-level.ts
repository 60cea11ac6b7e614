import { EngineInputError } from './engine-input-error'
import { costOptimalObsPerUnit } from './cost-optimal-obs-per-unit'
import { costOptimalUnitsPerLab } from './cost-optimal-units-per-lab'
import { planDesign } from './plan-design'
import { twoSidedTPower } from './two-sided-t-power'
import { normalQuantile } from './normal-quantile'
import { bestEffortDesign } from './planning/best-effort-design'
import { checkPlanSearchInput, type PlanSearchInput } from './planning/check-plan-search-input'
import { closingRemarks } from './planning/closing-remarks'
import { fewestLabsFor } from './planning/fewest-labs-for'
import type { PlanRemark } from './planning/plan-remark'
import type { PlanSearchResult } from './planning/plan-search-result'
import { planSearchModel } from './planning/plan-search-model'
import { designCounts } from './planning/design-counts'

export interface PlanThreeLevelInput extends PlanSearchInput {
  costPerLab: number
  costPerUnit: number
  costPerObs: number
}

export interface PlanThreeLevelResult extends PlanSearchResult {
  /** 'every-arm': L(c_lab + arms·k(c_unit + m·c_obs)); 'one-arm': arms·L(c_lab + k(c_unit + m·c_obs)). */
  cost: number
  /** Cost-optimal observations per unit before rounding; null without a finite optimum. */
  mStar: number | null
  /** Cost-optimal units per lab and arm at the recommended m, before rounding; null without a finite optimum. */
  kStar: number | null
}

const DEFAULT_OBS_CAP = 1000

interface Candidate {
  labs: number
  k: number
  m: number
  power: number
  cost: number
  df: number
}

/**
 * Cheapest three-level design (labs L, units per lab and arm k, observations per unit m) that
 * reaches the target power for the comparison of two arms, within optional limits.
 *
 * Model and test: threeLevelVariance / threeLevelPower (Raudenbush & Liu 2000, Psychol Methods
 * 5:199, extended with a unit level; df L − 1 when every lab runs every arm, 2(L − 1) when each
 * runs one arm). Cost: every lab runs every arm L·(c_lab + arms·k·(c_unit + m·c_obs)); each lab
 * runs one arm arms·L·(c_lab + k·(c_unit + m·c_obs)).
 *
 * Method: for L ≥ 2 the df depend on L only, so for each L the noncentrality λ* that gives the
 * target power is found once (bracketing, then the Illinois variant of regula falsi, keeping the
 * side whose power is at least the target). The variance must then be at most δ²/λ*², which for
 * each m gives the smallest whole k in closed form: k ≥ 2w/(L·δ²/λ*² − 2σ²_lab×arm) with
 * w = σ²_unit + σ²_resid/m (one arm per lab: k ≥ w/(L·δ²/(2λ*²) − σ²_lab − σ²_lab×arm)).
 * When the bracket is not positive no k suffices: the lab × arm variance alone is already too
 * large for L labs (the ceiling). Every L in the range and every m up to the limit (default
 * max(20, 4·m*), or 1000 without a finite m*) are tried, and the cheapest design wins (ties:
 * higher power, then fewer labs); labs are tried upwards and the search stops once L·c_lab alone
 * costs more than the best design so far. With a single lab (L = 1, allowed only when
 * σ²_lab×arm = 0) the df depend on k and the two-level planDesign is used, its cost plus c_lab.
 * m* = √((c_unit/c_obs)·σ²_resid/σ²_unit) (costOptimalObsPerUnit; Raudenbush 1997, Psychol Methods
 * 2:173) and k* (costOptimalUnitsPerLab) are reported for reference; whole numbers and degrees of
 * freedom can move the recommendation away from them.
 *
 * When nothing reaches the target: with a limit on units per lab, the most powerful design the
 * limits allow (most labs, units and observations); without one, the cheapest design with the most
 * labs allowed that comes within 2 percentage points of what those labs can reach at most.
 * `fewestLabs` says how many labs the target needs at the least.
 *
 * Guard errors: those of threeLevelPower and costOptimalObsPerUnit; arms not a whole number ≥ 2;
 * labs not whole, min > max, more than 1000, or no allowed number of labs (one lab with a lab × arm
 * variance above 0; fewer than 2 labs per arm when each lab runs one arm); limits that are not whole
 * numbers ≥ 1; no spread inside the labs (σ²_unit + σ²_resid = 0); target power outside (α, 1).
 *
 * @example
 * planThreeLevel({ labArmVariance: 2, unitVariance: 20, residualVariance: 100, difference: 8,
 *   minLabs: 2, maxLabs: 12, costPerLab: 2000, costPerUnit: 100, costPerObs: 1 })
 * // → { feasible: true, labs: 4, unitsPerLabArm: 5, obsPerUnit: 19, cost: 12760, achievedPower: 0.8007, df: 3, … }
 */
export function planThreeLevel(input: PlanThreeLevelInput): PlanThreeLevelResult {
  const checked = checkPlanSearchInput(input, 'planThreeLevel')
  const { design, arms, alpha, target, alphaPerComparison, variances, difference, within } = checked
  const { firstLabs, maxLabs, maxUnitsPerLabArm, maxObsPerUnit } = checked
  const { costPerLab, costPerUnit, costPerObs } = input
  if (typeof costPerLab !== 'number' || !Number.isFinite(costPerLab) || costPerLab < 0) {
    throw new EngineInputError(`planThreeLevel: costPerLab must be a non-negative number, got ${costPerLab}`)
  }
  const { unitVariance, residualVariance } = variances
  const icc = unitVariance / within
  const optimumM = costOptimalObsPerUnit({ costPerUnit, costPerObs, icc })
  const remarks: PlanRemark[] = []
  if (optimumM.note) remarks.push({ code: 'cost-optimum', note: optimumM.note })
  const mStar = optimumM.exact
  const searchCap =
    maxObsPerUnit ?? (Number.isFinite(mStar) ? Math.max(20, Math.ceil(4 * mStar)) : DEFAULT_OBS_CAP)
  if (maxObsPerUnit === undefined && !Number.isFinite(mStar)) {
    remarks.push({ code: 'obs-search-range', upTo: DEFAULT_OBS_CAP, why: 'no-finite-optimum' })
  }

  const armsPerLab = design === 'every-arm' ? arms : 1
  const labsBought = design === 'every-arm' ? 1 : arms
  const costOf = (labs: number, k: number, m: number) =>
    labsBought * labs * (costPerLab + armsPerLab * k * (costPerUnit + m * costPerObs))
  const model = planSearchModel(checked)
  const { powerAt, dfOf, between, ceilingOf } = model
  const delta = Math.abs(difference)

  /** Smallest whole k ≥ 1 (within the limit) that reaches `goal` with `labs` labs and m observations, from λ*. */
  const ncpCache = new Map<string, number>()
  const neededNcp = (df: number, goal: number) => {
    const key = `${df}/${goal}`
    let value = ncpCache.get(key)
    if (value === undefined) {
      value = requiredNcp(df, alphaPerComparison, goal)
      ncpCache.set(key, value)
    }
    return value
  }
  const searchLabs = (labs: number, goal: number): Candidate | null => {
    const df = dfOf(labs)
    const lambda = neededNcp(df, goal)
    const allowed = (delta * delta) / (lambda * lambda)
    // Room left for the units' share of the variance once the lab-level part is paid.
    const room = design === 'every-arm' ? labs * allowed - 2 * between : (labs * allowed) / 2 - between
    if (!(room > 0)) return null
    const scale = design === 'every-arm' ? 2 : 1
    let best: Candidate | null = null
    for (let m = 1; m <= searchCap; m++) {
      const w = unitVariance + residualVariance / m
      const k = Math.max(1, Math.ceil((scale * w) / room - 1e-9))
      if (maxUnitsPerLabArm !== undefined && k > maxUnitsPerLabArm) continue
      const cost = costOf(labs, k, m)
      if (!best || cost < best.cost - 1e-9) best = { labs, k, m, power: Number.NaN, cost, df }
    }
    if (best) best.power = powerAt(labs, best.k, best.m).power
    return best
  }

  let best: Candidate | null = null
  const better = (c: Candidate, than: Candidate | null) =>
    !than ||
    c.cost < than.cost - 1e-9 ||
    (Math.abs(c.cost - than.cost) <= 1e-9 &&
      (c.power > than.power + 1e-12 || (Math.abs(c.power - than.power) <= 1e-12 && c.labs < than.labs)))
  for (let labs = firstLabs; labs <= maxLabs; labs++) {
    // Labs alone (at one unit and one observation) already cost more than the best design: stop.
    if (best && costOf(labs, 1, 1) > best.cost + 1e-9) break
    const candidate = labs === 1 ? singleLab() : searchLabs(labs, target)
    if (candidate && better(candidate, best)) best = candidate
  }

  /**
   * One lab: the df depend on k, so the two-level planDesign plans it exactly, plus the lab's cost.
   * Its remarks are not passed on: each either repeats one said here already (the cost optimum,
   * the search range) or is said here in the lab's words (limits, Bonferroni).
   */
  function singleLab(): Candidate | null {
    if (maxUnitsPerLabArm !== undefined && maxUnitsPerLabArm < 2) return null
    const single = planDesign({
      icc,
      variance: within,
      difference,
      alpha,
      power: target,
      arms,
      costPerUnit,
      costPerObs,
      ...(maxUnitsPerLabArm === undefined ? {} : { maxUnitsPerArm: maxUnitsPerLabArm }),
      ...(maxObsPerUnit === undefined ? {} : { maxObsPerUnit }),
    })
    if (!single.feasible) return null
    return {
      labs: 1,
      k: single.unitsPerArm,
      m: single.obsPerUnit,
      power: single.achievedPower,
      cost: single.cost + costPerLab,
      df: 2 * (single.unitsPerArm - 1),
    }
  }

  const fewestLabs = fewestLabsFor(ceilingOf, firstLabs, target)
  const { chosen, remark: shortfall } = best
    ? { chosen: best, remark: null }
    : bestEffortDesign<Candidate>({
        checked,
        model,
        obsCap: searchCap,
        fewestLabs,
        mostAllowed: (labs, k, m) => {
          const power = powerAt(labs, k, m)
          return { labs, k, m, power: power.power, cost: costOf(labs, k, m), df: power.df }
        },
        nearCeiling: searchLabs,
        shown: 'cheapest',
        caller: 'planThreeLevel',
      })
  remarks.push(...closingRemarks(checked, chosen, shortfall))
  const kStar = costOptimalUnitsPerLab({
    design,
    arms,
    costPerLab,
    costPerUnit,
    costPerObs,
    obsPerUnit: chosen.m,
    ...variances,
  }).exact

  return {
    feasible: shortfall === null,
    design,
    ...designCounts(design, arms, chosen),
    cost: chosen.cost,
    achievedPower: chosen.power,
    df: chosen.df,
    alphaPerComparison,
    ceilingPower: ceilingOf(chosen.labs),
    fewestLabs,
    deff: 1 + (chosen.m - 1) * icc,
    mStar: Number.isFinite(mStar) ? mStar : null,
    kStar: Number.isFinite(kStar) ? kStar : null,
    searchedUpToObsPerUnit: searchCap,
    remarks,
  }
}

/**
 * Smallest noncentrality λ whose two-sided t power with `df` degrees of freedom reaches `goal`:
 * bracketing from the normal approximation, then Illinois regula falsi to a width of 1e-10, and
 * the upper end of the final bracket (its power is at least the goal).
 */
function requiredNcp(df: number, alpha: number, goal: number): number {
  const gap = (lambda: number) => twoSidedTPower(df, lambda, alpha).power - goal
  let low = 0
  let lowGap = alpha - goal
  let high = Math.max(1, normalQuantile(1 - alpha / 2) + normalQuantile(goal))
  let highGap = gap(high)
  while (highGap < 0) {
    low = high
    lowGap = highGap
    high *= 2
    if (high > 1e8) throw new EngineInputError('planThreeLevel: the target power cannot be reached')
    highGap = gap(high)
  }
  let side = 0
  for (let iteration = 0; iteration < 200 && high - low > 1e-10; iteration++) {
    const next = (low * highGap - high * lowGap) / (highGap - lowGap)
    const value = gap(next)
    if (value >= 0) {
      high = next
      highGap = value
      if (side === 1) lowGap /= 2
      side = 1
    } else {
      low = next
      lowGap = value
      if (side === -1) highGap /= 2
      side = -1
    }
  }
  return high
}
