import { EngineInputError } from './engine-input-error'
import { costOptimalObsPerUnit } from './cost-optimal-obs-per-unit'
import { costOptimalUnitsPerLab } from './cost-optimal-units-per-lab'
import { planDesign } from './plan-design'
import { threeLevelPower } from './three-level-power'
import type { LabDesign, ThreeLevelVariances } from './three-level-variance'
import { twoSidedTPower } from './two-sided-t-power'
import { normalQuantile } from './normal-quantile'
import { fewestLabsFor } from './planning/fewest-labs-for'

export interface PlanThreeLevelInput extends ThreeLevelVariances {
  /** Default 'every-arm': every lab runs every arm. 'one-arm': each lab runs one arm (L labs per arm). */
  design?: LabDesign
  /** Smallest difference between two arm means worth detecting, δ. */
  difference: number
  /** Two-sided family-wise significance level, default 0.05. */
  alpha?: number
  /** Target power of each pairwise comparison, default 0.8. */
  power?: number
  /** Number of arms, default 2. */
  arms?: number
  /** Fewest and most labs (labs per arm for 'one-arm') to consider; equal for a fixed number. */
  minLabs: number
  maxLabs: number
  costPerLab: number
  costPerUnit: number
  costPerObs: number
  /** Upper limit on units per lab and arm. */
  maxUnitsPerLabArm?: number
  /** Upper limit on observations per unit. */
  maxObsPerUnit?: number
  /** The outer level's name in the notes, singular and plural; default "lab", "labs". */
  labWords?: { one: string; many: string }
}

export interface PlanThreeLevelResult {
  /** False when no design within the limits reaches the target power (a best effort is reported). */
  feasible: boolean
  design: LabDesign
  /** L: labs ('every-arm') or labs per arm ('one-arm'). */
  labs: number
  unitsPerLabArm: number
  obsPerUnit: number
  arms: number
  /** L for 'every-arm', arms · L for 'one-arm'. */
  totalLabs: number
  totalUnits: number
  totalObs: number
  /** 'every-arm': L(c_lab + arms·k(c_unit + m·c_obs)); 'one-arm': arms·L(c_lab + k(c_unit + m·c_obs)). */
  cost: number
  /** Power of each pairwise comparison at `alphaPerComparison`. */
  achievedPower: number
  df: number
  /** α / (number of pairs) for more than two arms (Bonferroni), else α. */
  alphaPerComparison: number
  /** The most the recommended number of labs can reach, however many units and observations. */
  ceilingPower: number
  /** Fewest labs whose ceiling reaches the target power (labs per arm for 'one-arm'); null beyond 10 000. */
  fewestLabs: number | null
  /** Design effect 1 + (m − 1)ρ inside a unit, ρ = σ²_unit / (σ²_unit + σ²_resid). */
  deff: number
  /** Cost-optimal observations per unit before rounding; null without a finite optimum. */
  mStar: number | null
  /** Cost-optimal units per lab and arm at the recommended m, before rounding; null without a finite optimum. */
  kStar: number | null
  searchedUpToObsPerUnit: number
  /** Plain-language remarks, possibly empty. */
  notes: string[]
}

const MAX_LABS = 1000
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
  const design = input?.design ?? 'every-arm'
  const arms = input?.arms ?? 2
  if (!Number.isInteger(arms) || arms < 2) {
    throw new EngineInputError(`planThreeLevel requires a whole number of at least two arms, got ${arms}`)
  }
  const alpha = input.alpha ?? 0.05
  const target = input.power ?? 0.8
  if (typeof alpha !== 'number' || !(alpha > 0 && alpha < 1)) {
    throw new EngineInputError(`planThreeLevel: alpha must be between 0 and 1, got ${alpha}`)
  }
  if (typeof target !== 'number' || !(target > alpha && target < 1)) {
    throw new EngineInputError(
      `planThreeLevel: the target power must be between alpha (${alpha}) and 1, got ${target}`,
    )
  }
  const { minLabs, maxLabs, maxUnitsPerLabArm, maxObsPerUnit } = input
  if (
    !Number.isInteger(minLabs) ||
    !Number.isInteger(maxLabs) ||
    minLabs < 1 ||
    maxLabs < minLabs ||
    maxLabs > MAX_LABS
  ) {
    throw new EngineInputError(
      `planThreeLevel: labs must be whole numbers from 1 to ${MAX_LABS} with the smallest first, got ${minLabs} to ${maxLabs}`,
    )
  }
  if (maxUnitsPerLabArm !== undefined && !(Number.isInteger(maxUnitsPerLabArm) && maxUnitsPerLabArm >= 1)) {
    throw new EngineInputError(
      `planThreeLevel: maxUnitsPerLabArm must be a whole number of at least 1, got ${maxUnitsPerLabArm}`,
    )
  }
  if (maxObsPerUnit !== undefined && !(Number.isInteger(maxObsPerUnit) && maxObsPerUnit >= 1)) {
    throw new EngineInputError(
      `planThreeLevel: maxObsPerUnit must be a whole number of at least 1, got ${maxObsPerUnit}`,
    )
  }
  const { labArmVariance, unitVariance, residualVariance, difference, costPerLab, costPerUnit, costPerObs } =
    input
  const labVariance = input.labVariance ?? 0
  const word = input.labWords ?? { one: 'lab', many: 'labs' }
  const labsWord = (n: number) => (n === 1 ? word.one : word.many)
  const alphaPerComparison = alpha / ((arms * (arms - 1)) / 2)
  const variances = { labArmVariance, unitVariance, residualVariance, labVariance }
  // Validates the variances, the difference and α (one lab only when it is allowed).
  threeLevelPower({
    design,
    labs: design === 'one-arm' || labArmVariance > 0 ? 2 : 1,
    unitsPerLabArm: 2,
    obsPerUnit: 1,
    ...variances,
    difference,
    alpha: alphaPerComparison,
  })
  if (typeof costPerLab !== 'number' || !Number.isFinite(costPerLab) || costPerLab < 0) {
    throw new EngineInputError(`planThreeLevel: costPerLab must be a non-negative number, got ${costPerLab}`)
  }
  const within = unitVariance + residualVariance
  if (!(within > 0)) {
    throw new EngineInputError(
      'planThreeLevel needs some spread inside the labs (between units or between observations)',
    )
  }
  const icc = unitVariance / within
  const optimumM = costOptimalObsPerUnit({ costPerUnit, costPerObs, icc })
  const notes: string[] = []
  if (optimumM.note) notes.push(optimumM.note)
  const mStar = optimumM.exact
  const searchCap =
    maxObsPerUnit ?? (Number.isFinite(mStar) ? Math.max(20, Math.ceil(4 * mStar)) : DEFAULT_OBS_CAP)
  if (maxObsPerUnit === undefined && !Number.isFinite(mStar)) {
    notes.push(
      `Observations per unit were searched up to ${DEFAULT_OBS_CAP}; set a limit to search a different range.`,
    )
  }

  const oneLabAllowed = design === 'every-arm' && labArmVariance === 0
  const firstLabs = Math.max(minLabs, oneLabAllowed ? 1 : 2)
  if (firstLabs > maxLabs) {
    throw new EngineInputError(
      design === 'one-arm'
        ? `planThreeLevel: with each ${word.one} running one arm, at least 2 ${word.many} per arm are needed`
        : `planThreeLevel: with one ${word.one}, how much ${word.many} differ in their response cannot be told apart from the effect; allow at least 2 ${word.many}, or set the ${word.one} × condition variance to 0 to plan for one ${word.one} alone`,
    )
  }
  if (firstLabs === 1 && maxLabs === 1 && maxUnitsPerLabArm === 1) {
    throw new EngineInputError('planThreeLevel: with one lab, at least 2 units per arm are needed')
  }
  if (firstLabs > minLabs) {
    notes.push(
      design === 'one-arm'
        ? `With one ${word.one} per arm the ${word.many} cannot be compared with each other, so the search starts at 2 ${word.many} per arm.`
        : `With one ${word.one}, how much ${word.many} differ in their response cannot be measured, so the search starts at 2 ${word.many}.`,
    )
  }

  const armsPerLab = design === 'every-arm' ? arms : 1
  const labsBought = design === 'every-arm' ? 1 : arms
  const costOf = (labs: number, k: number, m: number) =>
    labsBought * labs * (costPerLab + armsPerLab * k * (costPerUnit + m * costPerObs))
  const dfOf = (labs: number) => (design === 'every-arm' ? labs - 1 : 2 * (labs - 1))
  const between = design === 'every-arm' ? labArmVariance : labVariance + labArmVariance
  const delta = Math.abs(difference)
  const powerAt = (labs: number, k: number, m: number) =>
    threeLevelPower({
      design,
      labs,
      unitsPerLabArm: k,
      obsPerUnit: m,
      ...variances,
      difference,
      alpha: alphaPerComparison,
    })

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
  let singleLabNotes: string[] = []
  for (let labs = firstLabs; labs <= maxLabs; labs++) {
    // Labs alone (at one unit and one observation) already cost more than the best design: stop.
    if (best && costOf(labs, 1, 1) > best.cost + 1e-9) break
    let candidate: Candidate | null
    if (labs === 1) {
      candidate = null
      if (maxUnitsPerLabArm === undefined || maxUnitsPerLabArm >= 2) {
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
        singleLabNotes = single.notes.filter(
          (note) =>
            !notes.includes(note) && !note.startsWith('No design') && !/Bonferroni|binding/.test(note),
        )
        if (single.feasible) {
          candidate = {
            labs: 1,
            k: single.unitsPerArm,
            m: single.obsPerUnit,
            power: single.achievedPower,
            cost: single.cost + costPerLab,
            df: 2 * (single.unitsPerArm - 1),
          }
        }
      }
    } else {
      candidate = searchLabs(labs, target)
    }
    if (candidate && better(candidate, best)) best = candidate
  }

  const ceilingOf = (labs: number) =>
    labs === 1 || between === 0
      ? 1
      : twoSidedTPower(dfOf(labs), delta / Math.sqrt((2 * between) / labs), alphaPerComparison).power
  const fewestLabs = fewestLabsFor(ceilingOf, firstLabs, target)

  let feasible = true
  if (!best) {
    feasible = false
    const labs = maxLabs
    if (maxUnitsPerLabArm !== undefined) {
      const k = labs === 1 ? Math.max(2, maxUnitsPerLabArm) : maxUnitsPerLabArm
      const power = powerAt(labs, k, searchCap)
      best = { labs, k, m: searchCap, power: power.power, cost: costOf(labs, k, searchCap), df: power.df }
      notes.push(
        `No design within ${labs} ${labsWord(labs)}, ${k} units per ${word.one} and arm and ${searchCap} observations per unit reaches ${asPercent(target)} power; the most powerful one reaches ${asPercent(best.power)}.`,
      )
    } else {
      const ceiling = ceilingOf(labs)
      const goal = ceiling - Math.min(0.02, (ceiling - alphaPerComparison) / 2)
      best = searchLabs(labs, goal)
      if (!best) throw new Error('planThreeLevel: no design below the ceiling was found')
      notes.push(
        `No design with at most ${labs} ${labsWord(labs)} reaches ${asPercent(target)} power: with ${labs} ${labsWord(labs)} no number of units gets past ${asPercent(ceiling)}, because ${word.many} differ ${design === 'one-arm' ? 'from each other' : 'in how strongly they respond'}.${fewestLabs === null ? '' : ` It takes at least ${fewestLabs} ${labsWord(fewestLabs)}.`} Shown: the cheapest design within 2 points of that limit.`,
      )
    }
  } else {
    if (maxUnitsPerLabArm !== undefined && best.k === maxUnitsPerLabArm)
      notes.push(`The limit on units per ${word.one} and arm is binding.`)
    if (maxObsPerUnit !== undefined && best.m === maxObsPerUnit)
      notes.push('The limit on observations per unit is binding.')
    if (best.labs === maxLabs && maxLabs > minLabs)
      notes.push(`The largest number of ${word.many} allowed is binding.`)
  }
  if (best.labs === 1) notes.push(...singleLabNotes)
  if (arms > 2) {
    notes.push(
      `With ${arms} arms the power is that of each pairwise comparison at the Bonferroni level ${alphaPerComparison.toPrecision(3)}.`,
    )
  }
  const kStar = costOptimalUnitsPerLab({
    design,
    arms,
    costPerLab,
    costPerUnit,
    costPerObs,
    obsPerUnit: best.m,
    ...variances,
  }).exact

  return {
    feasible,
    design,
    labs: best.labs,
    unitsPerLabArm: best.k,
    obsPerUnit: best.m,
    arms,
    totalLabs: labsBought * best.labs,
    totalUnits: arms * best.labs * best.k,
    totalObs: arms * best.labs * best.k * best.m,
    cost: best.cost,
    achievedPower: best.power,
    df: best.df,
    alphaPerComparison,
    ceilingPower: ceilingOf(best.labs),
    fewestLabs,
    deff: 1 + (best.m - 1) * icc,
    mStar: Number.isFinite(mStar) ? mStar : null,
    kStar: Number.isFinite(kStar) ? kStar : null,
    searchedUpToObsPerUnit: searchCap,
    notes,
  }
}

/** 0.8 → "80 %", 0.533 → "53 %" (whole percentage points, as the planner shows power). */
function asPercent(p: number): string {
  return `${Math.round(p * 100)} %`
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
