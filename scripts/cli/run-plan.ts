import { readFileSync } from 'node:fs'
import { AnalysisResult } from '../../shared/schemas/analysis-result'
import { clusterPower } from '../../shared/stats/cluster-power'
import { costOptimalObsPerUnit, type CostOptimalResult } from '../../shared/stats/cost-optimal-obs-per-unit'
import { ENGINE_VERSION } from '../../shared/stats/engine-version'
import { planDesign, type PlanDesignResult } from '../../shared/stats/plan-design'
import { powerCurve, type PowerCurveResult } from '../../shared/stats/power-curve'
import { unitsNeeded, type UnitsNeededResult } from '../../shared/stats/units-needed'
import { CliInputError } from './cli-input-error'
import type { PlanArgs } from './plan-args'

export interface PlanOutput {
  inputs: {
    icc: number
    /** Where the ICC came from: typed in, or the level of a saved analysis. */
    iccSource: { kind: 'given' } | { kind: 'analysis'; level: string }
    sdTotal: number
    sdSource: 'given' | 'analysis'
    difference: number
    alpha: number
    /** α per pairwise comparison: α split over the arms' pairs (Bonferroni) for more than 2 arms. */
    alphaPerComparison: number
    targetPower: number
    arms: number
  }
  power: {
    unitsPerArm: number
    obsPerUnit: number
    power: number
    deff: number
    df: number
    ncp: number
  } | null
  unitsNeeded: (UnitsNeededResult & { obsPerUnit: number }) | null
  cheapestDesign: PlanDesignResult | null
  /** exact is null when there is no finite optimum. */
  costOptimal: (Omit<CostOptimalResult, 'exact'> & { exact: number | null }) | null
  grid: PowerCurveResult | null
  engine: { version: string }
}

/** ICC and total SD of a saved analysis: the ICC of the level that carries the condition (else the innermost level). */
function fromAnalysis(path: string): { icc: number; level: string; sdTotal: number } {
  let raw: string
  try {
    raw = readFileSync(path, 'utf8')
  } catch (error) {
    const code = (error as NodeJS.ErrnoException).code
    throw new CliInputError(
      `Cannot read "${path}": ${code === 'ENOENT' ? 'no such file' : (error as Error).message}.`,
    )
  }
  let parsed
  try {
    parsed = AnalysisResult.safeParse(JSON.parse(raw))
  } catch {
    throw new CliInputError(`"${path}" is not JSON; pass the output of "nestwise analyze".`)
  }
  if (!parsed.success)
    throw new CliInputError(
      `"${path}" is not a result of "nestwise analyze" (${parsed.error.issues[0]?.path.join('.')}: ${parsed.error.issues[0]?.message}).`,
    )
  const result = parsed.data
  const level = result.conditionLevel ?? result.levels[result.levels.length - 1].name
  const icc = result.icc.find((entry) => entry.level === level)
  if (!icc) throw new CliInputError(`"${path}" has no ICC for the level "${level}".`)
  const variance = result.varianceComponents.reduce((sum, c) => sum + c.variance, 0)
  return { icc: icc.icc, level, sdTotal: Math.sqrt(variance) }
}

/**
 * Runs the planner for the command line: power of a given design, units needed, the cheapest
 * design and the cost-optimal observations per unit, a power grid; each only when asked for.
 */
export function runPlan(args: PlanArgs): PlanOutput {
  const analysis = args.from ? fromAnalysis(args.from) : null
  const icc = args.icc ?? analysis!.icc
  const sdTotal = args.sd ?? (args.variance !== null ? Math.sqrt(args.variance) : analysis!.sdTotal)
  const alphaPerComparison = args.alpha / ((args.arms * (args.arms - 1)) / 2)
  const spread = { sdTotal, icc, difference: args.difference }

  const power =
    args.units !== null && args.obs !== null
      ? {
          unitsPerArm: args.units,
          obsPerUnit: args.obs,
          ...pick(
            clusterPower({
              ...spread,
              unitsPerArm: args.units,
              obsPerUnit: args.obs,
              alpha: alphaPerComparison,
            }),
          ),
        }
      : null
  const needed =
    args.obs !== null && args.units === null
      ? {
          obsPerUnit: args.obs,
          ...unitsNeeded({ ...spread, obsPerUnit: args.obs, alpha: alphaPerComparison, power: args.power }),
        }
      : null
  let cheapestDesign: PlanDesignResult | null = null
  let costOptimal: PlanOutput['costOptimal'] = null
  if (args.costUnit !== null && args.costObs !== null) {
    cheapestDesign = planDesign({
      ...spread,
      alpha: args.alpha,
      power: args.power,
      arms: args.arms,
      costPerUnit: args.costUnit,
      costPerObs: args.costObs,
      ...(args.maxUnits === null ? {} : { maxUnitsPerArm: args.maxUnits }),
      ...(args.maxObs === null ? {} : { maxObsPerUnit: args.maxObs }),
    })
    const optimum = costOptimalObsPerUnit({ costPerUnit: args.costUnit, costPerObs: args.costObs, icc })
    costOptimal = { ...optimum, exact: Number.isFinite(optimum.exact) ? optimum.exact : null }
  }
  const grid =
    args.gridUnits && args.gridObs
      ? powerCurve({
          ...spread,
          alpha: args.alpha,
          arms: args.arms,
          kValues: args.gridUnits,
          mValues: args.gridObs,
        })
      : null

  return {
    inputs: {
      icc,
      iccSource: args.icc === null ? { kind: 'analysis', level: analysis!.level } : { kind: 'given' },
      sdTotal,
      sdSource: args.sd === null && args.variance === null ? 'analysis' : 'given',
      difference: args.difference,
      alpha: args.alpha,
      alphaPerComparison,
      targetPower: args.power,
      arms: args.arms,
    },
    power,
    unitsNeeded: needed,
    cheapestDesign,
    costOptimal,
    grid,
    engine: { version: ENGINE_VERSION },
  }
}

function pick(result: ReturnType<typeof clusterPower>) {
  return { power: result.power, deff: result.deff, df: result.df, ncp: result.ncp }
}
