import type { PlanInputs, PlanResult } from '../schemas/plans'
import { clusterPower } from '../stats/cluster-power'
import { ENGINE_VERSION } from '../stats/engine-version'
import { planDesign } from '../stats/plan-design'
import { powerCurve } from '../stats/power-curve'
import { resolveSpread } from './resolve-spread'

/** Observations-per-unit values drawn as separate power curves: 1, the recommendation, and a spread around it. */
function curveObsValues(recommended: number): number[] {
  const values = new Set([1, 5, 10, 20, 50, recommended])
  return [...values].sort((a, b) => a - b)
}

function unitsRange(recommended: number): number[] {
  const top = Math.max(12, Math.min(200, Math.ceil(recommended * 2)))
  const step = Math.max(1, Math.ceil((top - 2) / 60))
  const values: number[] = []
  for (let k = 2; k <= top; k += step) values.push(k)
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
 * The planner's whole answer from its inputs: the cheapest design reaching the target power
 * (planDesign), power curves (powerCurve), what more observations per unit buy at the recommended
 * number of units (clusterPower, and m / design effect), and a small table of designs around the
 * recommendation. Throws the engine's EngineInputError for impossible inputs.
 */
export function computePlan(inputs: PlanInputs): PlanResult {
  const { icc, sdTotal } = resolveSpread(inputs)
  const base = { sdTotal, icc, difference: inputs.difference }
  const design = planDesign({
    ...base,
    alpha: inputs.alpha,
    power: inputs.targetPower,
    arms: inputs.arms,
    costPerUnit: inputs.costPerUnit,
    costPerObs: inputs.costPerObs,
    ...(inputs.maxUnitsPerArm === null ? {} : { maxUnitsPerArm: inputs.maxUnitsPerArm }),
    ...(inputs.maxObsPerUnit === null ? {} : { maxObsPerUnit: inputs.maxObsPerUnit }),
  })
  const alpha = design.alphaPerComparison
  const k = design.unitsPerArm
  const m = design.obsPerUnit
  const costOf = (units: number, obs: number) =>
    inputs.arms * units * (inputs.costPerUnit + obs * inputs.costPerObs)

  const curveObs = curveObsValues(m)
  const grid = powerCurve({
    ...base,
    alpha: inputs.alpha,
    arms: inputs.arms,
    kValues: unitsRange(k),
    mValues: curveObs,
  })
  const powerCurves = curveObs.map((obs, j) => ({
    obsPerUnit: obs,
    points: grid.kValues.map((units, i) => ({ unitsPerArm: units, power: grid.power[i][j] })),
  }))

  const obsCurve = obsRange(m).map((obs) => ({
    obsPerUnit: obs,
    power: clusterPower({ ...base, unitsPerArm: k, obsPerUnit: obs, alpha }).power,
    effectivePerUnit: obs / (1 + (obs - 1) * icc),
  }))

  const table: PlanResult['table'] = []
  const seen = new Set<string>()
  for (const units of [k - 2, k - 1, k, k + 1, k + 2]) {
    for (const obs of [Math.max(1, Math.round(m / 2)), m, m * 2]) {
      const key = `${units}/${obs}`
      if (units < 2 || seen.has(key)) continue
      seen.add(key)
      table.push({
        unitsPerArm: units,
        obsPerUnit: obs,
        power: clusterPower({ ...base, unitsPerArm: units, obsPerUnit: obs, alpha }).power,
        cost: costOf(units, obs),
        recommended: units === k && obs === m,
      })
    }
  }

  return {
    icc,
    sdTotal,
    feasible: design.feasible,
    unitsPerArm: k,
    obsPerUnit: m,
    totalUnits: design.totalUnits,
    totalObs: design.totalObs,
    cost: design.cost,
    power: design.achievedPower,
    alphaPerComparison: alpha,
    designEffect: design.deff,
    effectivePerUnit: m / design.deff,
    mStar: design.mStar,
    notes: design.notes,
    powerCurves,
    obsCurve,
    table,
    engineVersion: ENGINE_VERSION,
  }
}
