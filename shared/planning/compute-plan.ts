import { hasCosts, type PlanInputs, type PlanLabCurve, type PlanResult } from '../schemas/plans'
import { ENGINE_VERSION } from '../stats/engine-version'
import { planFewestUnits } from '../stats/plan-fewest-units'
import { planThreeLevel } from '../stats/plan-three-level'
import { threeLevelPower } from '../stats/three-level-power'
import { planNotes } from './plan-notes'
import { pluralOf } from './plural-of'
import { resolveLevels } from './resolve-levels'

/** Observations-per-unit values drawn as separate power curves: 1, the recommendation, and a spread around it. */
function curveObsValues(recommended: number): number[] {
  const values = new Set([1, 5, 10, 20, 50, recommended])
  return [...values].sort((a, b) => a - b)
}

function unitsRange(recommended: number, first: number): number[] {
  const top = Math.max(12, Math.min(200, Math.ceil(recommended * 2)))
  const step = Math.max(1, Math.ceil((top - first) / 60))
  const values: number[] = []
  for (let k = first; k <= top; k += step) values.push(k)
  if (!values.includes(recommended)) values.push(recommended)
  return values.sort((a, b) => a - b)
}

function obsRange(recommended: number): number[] {
  const top = Math.max(60, recommended * 2)
  const values = new Set<number>([recommended])
  for (let m = 1; m <= top; m += m < 10 ? 1 : m < 40 ? 2 : Math.ceil(top / 40)) values.add(m)
  return [...values].sort((a, b) => a - b)
}

/**
 * Numbers of labs drawn in the labs chart: the fewest allowed, the last number that cannot reach
 * the target and the first that can (where the ceiling bites), the recommendation and twice it.
 */
function labValues(first: number, recommended: number, fewest: number | null): number[] {
  const values = new Set([first, recommended, recommended * 2])
  if (fewest !== null) {
    values.add(fewest)
    if (fewest - 1 >= first) values.add(fewest - 1)
  }
  return [...values]
    .filter((l) => l >= first && l <= 1000)
    .sort((a, b) => a - b)
    .slice(0, 6)
}

/** The design search: the cheapest with costs (planThreeLevel), the fewest units without (planFewestUnits). */
function searchDesign(inputs: PlanInputs, levels: ReturnType<typeof resolveLevels>) {
  const { outer } = inputs
  const common = {
    design: levels.design,
    labArmVariance: levels.labArmVariance,
    labVariance: levels.labVariance,
    unitVariance: levels.unitVariance,
    residualVariance: levels.residualVariance,
    difference: inputs.difference,
    alpha: inputs.alpha,
    power: inputs.targetPower,
    arms: inputs.arms,
    minLabs: outer.minLabs,
    maxLabs: outer.maxLabs,
    ...(inputs.maxUnitsPerArm === null ? {} : { maxUnitsPerLabArm: inputs.maxUnitsPerArm }),
    ...(inputs.maxObsPerUnit === null ? {} : { maxObsPerUnit: inputs.maxObsPerUnit }),
    labWords: { one: outer.name, many: pluralOf(outer.name) },
  }
  if (!hasCosts(inputs)) {
    const plan = planFewestUnits(common)
    return { ...plan, cost: null, mStar: null, kStar: null }
  }
  return planThreeLevel({
    ...common,
    costPerLab: outer.costPerLab ?? 0,
    costPerUnit: inputs.costPerUnit ?? 0,
    costPerObs: inputs.costPerObs ?? 0,
  })
}

/** What a proportion or rate plan rests on, said first among the notes. */
function measureNotes(inputs: PlanInputs, observedIcc: number): string[] {
  const { measure, difference } = inputs
  if (measure.kind === 'mean') return []
  const what = measure.kind === 'proportion' ? 'proportion' : 'rate'
  const fmt = (x: number) => Number(x.toPrecision(3)).toString()
  const target = measure.control + difference
  const scale = measure.kind === 'proportion' ? 'log odds' : 'log'
  return [
    `Planned for a ${what} of ${fmt(measure.control)} in the control arm against ${fmt(target)}: a difference of ${fmt(difference)}.`,
    `The ICC of ${fmt(measure.latentIcc)} on the latent (${scale}) scale is ${fmt(observedIcc)} on the scale of the ${measure.kind === 'proportion' ? 'yes/no values' : 'counts'} at the average ${what} ${fmt(measure.control + difference / 2)} (${measure.kind === 'proportion' ? 'Goldstein, Browne & Rasbash 2002; computed by numerical integration' : 'lognormal–Poisson moments; Nakagawa, Johnson & Schielzeth 2017'}), and the design effect 1 + (m − 1)·ICC uses the pooled variance there (Donner & Klar 2000). This approximates the ${measure.kind === 'proportion' ? 'logistic' : 'Poisson'} mixed model the data will be analysed with; it is usually slightly conservative.`,
  ]
}

/**
 * The planner's whole answer from its inputs: the cheapest design reaching the target power over
 * labs, units per lab and arm and observations per unit (planThreeLevel; with one lab, the
 * two-level plan exactly), or without costs the design with the fewest independent units
 * (planFewestUnits), power curves against units for several observations per unit, what more
 * observations buy at the recommended units, power for several numbers of labs with the ceiling
 * each can reach, and a small table of designs around the recommendation. Throws the engine's
 * EngineInputError for impossible inputs.
 */
export function computePlan(inputs: PlanInputs): PlanResult {
  const levels = resolveLevels(inputs)
  const { outer } = inputs
  const variances = {
    design: levels.design,
    labArmVariance: levels.labArmVariance,
    labVariance: levels.labVariance,
    unitVariance: levels.unitVariance,
    residualVariance: levels.residualVariance,
  }
  const design = searchDesign(inputs, levels)
  const counts = design.cost === null
  const alpha = design.alphaPerComparison
  const L = design.labs
  const k = design.unitsPerLabArm
  const m = design.obsPerUnit
  const powerAt = (labs: number, units: number, obs: number) =>
    threeLevelPower({
      ...variances,
      labs,
      unitsPerLabArm: units,
      obsPerUnit: obs,
      difference: inputs.difference,
      alpha,
    })
  const costOf = (labs: number, units: number, obs: number) =>
    counts
      ? null
      : (levels.design === 'one-arm' ? inputs.arms : 1) *
        labs *
        ((outer.costPerLab ?? 0) +
          (levels.design === 'one-arm' ? 1 : inputs.arms) *
            units *
            ((inputs.costPerUnit ?? 0) + obs * (inputs.costPerObs ?? 0)))
  const minUnits = (labs: number) => (labs === 1 && levels.design === 'every-arm' ? 2 : 1)

  const curveObs = curveObsValues(m)
  const kValues = unitsRange(k, minUnits(L))
  const powerCurves = curveObs.map((obs) => ({
    obsPerUnit: obs,
    points: kValues.map((units) => ({ unitsPerArm: units, power: powerAt(L, units, obs).power })),
  }))

  const obsCurve = obsRange(m).map((obs) => ({
    obsPerUnit: obs,
    power: powerAt(L, k, obs).power,
    effectivePerUnit: obs / (1 + (obs - 1) * levels.icc),
  }))

  const labCurves: PlanLabCurve[] = []
  if (levels.multiLab) {
    const first =
      levels.design === 'every-arm' && levels.labArmVariance === 0 ? Math.max(1, outer.minLabs) : 2
    for (const labs of labValues(first, L, design.fewestLabs)) {
      const units = unitsRange(k, minUnits(labs))
      labCurves.push({
        labs,
        ceilingPower: powerAt(labs, Math.max(k, minUnits(labs)), m).ceilingPower,
        byUnits: units.map((u) => ({ unitsPerArm: u, power: powerAt(labs, u, m).power })),
        byObs: obsRange(m).map((obs) => ({
          obsPerUnit: obs,
          power: powerAt(labs, Math.max(k, minUnits(labs)), obs).power,
        })),
      })
    }
  }

  const table: PlanResult['table'] = []
  const seen = new Set<string>()
  const addRow = (labs: number, units: number, obs: number) => {
    const key = `${labs}/${units}/${obs}`
    if (labs < 1 || units < minUnits(labs) || obs < 1 || seen.has(key)) return
    if (labs === 1 && levels.design === 'one-arm') return
    if (labs === 1 && levels.labArmVariance > 0) return
    seen.add(key)
    table.push({
      labs,
      unitsPerArm: units,
      obsPerUnit: obs,
      power: powerAt(labs, units, obs).power,
      cost: costOf(labs, units, obs),
      recommended: labs === L && units === k && obs === m,
    })
  }
  const halfM = Math.max(1, Math.round(m / 2))
  if (counts) {
    // Without costs the trade-off to show is units against observations: each row has the fewest
    // observations per unit that reach the target with that many units.
    const cap = design.searchedUpToObsPerUnit
    const fewestObs = (labs: number, units: number): number | null => {
      if (units < minUnits(labs) || powerAt(labs, units, cap).power < inputs.targetPower) return null
      let low = 0
      let high = cap
      while (high - low > 1) {
        const mid = Math.floor((low + high) / 2)
        if (powerAt(labs, units, mid).power >= inputs.targetPower) high = mid
        else low = mid
      }
      return high
    }
    addRow(L, k, m)
    for (const units of [k + 1, k + 2, k + 3, k + 5]) {
      const obs = fewestObs(L, units)
      if (obs !== null) addRow(L, units, obs)
    }
    if (levels.multiLab) {
      for (const labs of [L - 1, L + 1]) {
        if (labs < outer.minLabs || labs > outer.maxLabs || labs < 1) continue
        const obs = fewestObs(labs, k)
        if (obs !== null) addRow(labs, k, obs)
      }
    }
    table.sort((a, b) => a.labs - b.labs || a.unitsPerArm - b.unitsPerArm || a.obsPerUnit - b.obsPerUnit)
  } else if (!levels.multiLab) {
    for (const units of [k - 2, k - 1, k, k + 1, k + 2])
      for (const obs of [halfM, m, m * 2]) addRow(L, units, obs)
  } else {
    for (const labs of [L - 1, L, L + 1]) for (const units of [k - 1, k, k + 1]) addRow(labs, units, m)
    addRow(L, k, halfM)
    addRow(L, k, m * 2)
    table.sort((a, b) => a.labs - b.labs || a.unitsPerArm - b.unitsPerArm || a.obsPerUnit - b.obsPerUnit)
  }

  const notes = [
    ...measureNotes(inputs, levels.icc),
    ...planNotes(design.remarks, { one: outer.name, many: pluralOf(outer.name) }),
  ]
  if (!levels.multiLab && outer.effectSd !== null && outer.effectSd > 0) {
    notes.push(
      `With one ${outer.name}, how much the effect differs between ${pluralOf(outer.name)} does not enter: the plan is for this ${outer.name} alone.`,
    )
  }

  const { measure } = inputs
  return {
    ...(measure.kind === 'mean'
      ? {}
      : {
          measure: {
            kind: measure.kind,
            control: measure.control,
            target: measure.control + inputs.difference,
            latentIcc: measure.latentIcc,
          },
        }),
    icc: levels.icc,
    sdTotal: levels.sdTotal,
    feasible: design.feasible,
    labs: L,
    design: levels.design,
    totalLabs: design.totalLabs,
    unitsPerArm: k,
    obsPerUnit: m,
    totalUnits: design.totalUnits,
    totalObs: design.totalObs,
    cost: design.cost,
    objective: counts ? 'counts' : 'cost',
    power: design.achievedPower,
    alphaPerComparison: alpha,
    designEffect: design.deff,
    effectivePerUnit: m / design.deff,
    mStar: design.mStar,
    kStar: design.kStar,
    df: design.df,
    labArmVariance: levels.design === 'one-arm' ? levels.labVariance : levels.labArmVariance,
    labArmVarianceAssumed: levels.assumed,
    ceilingPower: design.ceilingPower,
    fewestLabs: design.fewestLabs,
    notes,
    powerCurves,
    labCurves,
    obsCurve,
    table,
    engineVersion: ENGINE_VERSION,
  }
}
