import { readFileSync } from 'node:fs'
import { planNotes } from '../../shared/planning/plan-notes'
import { threeLevelComponents } from '../../shared/planning/three-level-components'
import { AnalysisResult } from '../../shared/schemas/analysis-result'
import { clusterPower } from '../../shared/stats/cluster-power'
import { costOptimalObsPerUnit, type CostOptimalResult } from '../../shared/stats/cost-optimal-obs-per-unit'
import {
  costOptimalUnitsPerLab,
  type CostOptimalUnitsPerLabResult,
} from '../../shared/stats/cost-optimal-units-per-lab'
import { ENGINE_VERSION } from '../../shared/stats/engine-version'
import { planDesign, type PlanDesignResult } from '../../shared/stats/plan-design'
import { planThreeLevel, type PlanThreeLevelResult } from '../../shared/stats/plan-three-level'
import { powerCurve, type PowerCurveResult } from '../../shared/stats/power-curve'
import { threeLevelPower } from '../../shared/stats/three-level-power'
import { unitsNeeded, type UnitsNeededResult } from '../../shared/stats/units-needed'
import { CliInputError } from './cli-input-error'
import type { PlanArgs } from './plan-args'

/** The outer level of a three-level plan (present only when --labs was given). */
export interface PlanLabsInput {
  /** Fixed (min = max) or a range searched by the cheapest design. */
  labs: { min: number; max: number }
  design: 'every-arm' | 'one-arm'
  costPerLab: number
  /** σ²_lab×arm used ('every-arm'); 0 for 'one-arm'. */
  labArmVariance: number
  /** 'unknown': an analysis without a lab × condition term and none given: planned as 0 (optimistic). */
  labArmVarianceSource: 'given' | 'analysis' | 'unknown'
  /** 'one-arm': variance between labs' means within an arm. */
  labVariance: number
  /** The spread inside a lab and arm, split by the ICC. */
  unitVariance: number
  residualVariance: number
  /** How an analysis's components were put on the three levels (with --from), in words. */
  mapping: string[]
}

export interface ThreeLevelPowerOutput {
  labs: number
  unitsPerLabArm: number
  obsPerUnit: number
  power: number
  variance: number
  df: number
  ncp: number
  /** The most these labs can reach, however many units and observations. */
  ceilingPower: number
}

export interface ThreeLevelGrid {
  labs: number
  kValues: number[]
  mValues: number[]
  /** power[i][j]: kValues[i] units per lab and arm, mValues[j] observations per unit. */
  power: number[][]
  ceilingPower: number
  alphaPerComparison: number
}

/** planThreeLevel's answer with its remarks in words, as the two-level design carries them. */
export type ThreeLevelDesignOutput = Omit<PlanThreeLevelResult, 'remarks'> & { notes: string[] }

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
    /** Present with --labs: the outer level and the three variances. */
    labs?: PlanLabsInput
  }
  power:
    | ThreeLevelPowerOutput
    | {
        unitsPerArm: number
        obsPerUnit: number
        power: number
        deff: number
        df: number
        ncp: number
      }
    | null
  unitsNeeded: (UnitsNeededResult & { obsPerUnit: number }) | null
  cheapestDesign: PlanDesignResult | ThreeLevelDesignOutput | null
  /** exact is null when there is no finite optimum; unitsPerLab (k*) with --labs. */
  costOptimal:
    | (Omit<CostOptimalResult, 'exact'> & {
        exact: number | null
        unitsPerLab?: Omit<CostOptimalUnitsPerLabResult, 'exact'> & { exact: number | null }
      })
    | null
  grid: PowerCurveResult | ThreeLevelGrid | null
  engine: { version: string }
}

/** A saved analysis result, or a one-line input error. */
function readAnalysis(path: string): AnalysisResult {
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
  // A binary or count analysis has its variances on the latent scale: a plan of means from them
  // would mix scales. The app's planner plans a difference in proportions or rates from them.
  if (parsed.data.family === 'binomial' || parsed.data.family === 'poisson')
    throw new CliInputError(
      `"${path}" is a ${parsed.data.family === 'binomial' ? 'yes/no' : 'count'} analysis, whose variances are on the latent scale; plan it in the app's planner (a difference in proportions or rates), not with --from.`,
    )
  return parsed.data
}

/** ICC and total SD of a saved analysis: the ICC of the level that carries the condition (else the innermost level). */
function fromAnalysis(path: string): { icc: number; level: string; sdTotal: number } {
  const result = readAnalysis(path)
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
  if (args.labs !== null) return runThreeLevelPlan(args, args.labs)
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
    inputs: plannedInputs(args, { icc, sdTotal, alphaPerComparison, iccLevel: analysis?.level ?? null }),
    power,
    unitsNeeded: needed,
    cheapestDesign,
    costOptimal,
    grid,
    engine: { version: ENGINE_VERSION },
  }
}

/**
 * The numbers a plan was made with, as the output repeats them. `iccLevel` names the level of the
 * saved analysis the ICC came from when none was typed in.
 */
function plannedInputs(
  args: PlanArgs,
  found: { icc: number; sdTotal: number; alphaPerComparison: number; iccLevel: string | null },
): Omit<PlanOutput['inputs'], 'labs'> {
  return {
    icc: found.icc,
    iccSource: args.icc === null ? { kind: 'analysis', level: found.iccLevel! } : { kind: 'given' },
    sdTotal: found.sdTotal,
    sdSource: args.sd === null && args.variance === null ? 'analysis' : 'given',
    difference: args.difference,
    alpha: args.alpha,
    alphaPerComparison: found.alphaPerComparison,
    targetPower: args.power,
    arms: args.arms,
  }
}

function pick(result: ReturnType<typeof clusterPower>) {
  return { power: result.power, deff: result.deff, df: result.df, ncp: result.ncp }
}

/** Three levels from a saved analysis (threeLevelComponents), with the ICC and SD inside a lab and arm. */
function threeLevelFromAnalysis(path: string) {
  const result = readAnalysis(path)
  const components = threeLevelComponents(result)
  const within = components ? components.unitVariance + components.residualVariance : 0
  if (!components || !(within > 0))
    throw new CliInputError(`"${path}" has no spread inside the labs to plan with.`)
  return { components, icc: components.unitVariance / within, sdTotal: Math.sqrt(within) }
}

/**
 * --labs: plans over three levels (labs, units per lab and arm, observations per unit) with
 * threeLevelPower and planThreeLevel. The ICC and SD (typed or from --from) describe the spread
 * inside one lab and arm.
 */
function runThreeLevelPlan(args: PlanArgs, labs: { min: number; max: number }): PlanOutput {
  const analysis = args.from ? threeLevelFromAnalysis(args.from) : null
  const icc = args.icc ?? analysis!.icc
  const sdTotal = args.sd ?? (args.variance !== null ? Math.sqrt(args.variance) : analysis!.sdTotal)
  const design = args.oneArmPerLab ? 'one-arm' : 'every-arm'
  const fromData = analysis?.components ?? null
  const analysisLabArm = fromData === null ? null : design === 'one-arm' ? null : fromData.labArmVariance
  const labArmVariance = design === 'one-arm' ? 0 : (args.labArmVariance ?? analysisLabArm ?? 0)
  const labArmVarianceSource: PlanLabsInput['labArmVarianceSource'] =
    args.labArmVariance !== null || design === 'one-arm'
      ? 'given'
      : analysisLabArm !== null
        ? 'analysis'
        : 'unknown'
  const labVariance =
    design === 'one-arm'
      ? (args.labVariance ?? (fromData ? fromData.labVariance + (fromData.labArmVariance ?? 0) : 0))
      : 0
  const variance = sdTotal * sdTotal
  const variances = {
    design,
    labArmVariance,
    labVariance,
    unitVariance: icc * variance,
    residualVariance: (1 - icc) * variance,
  } as const
  const alphaPerComparison = args.alpha / ((args.arms * (args.arms - 1)) / 2)
  const costPerLab = args.costLab ?? 0

  let power: ThreeLevelPowerOutput | null = null
  if (args.units !== null && args.obs !== null) {
    const r = threeLevelPower({
      ...variances,
      labs: labs.min,
      unitsPerLabArm: args.units,
      obsPerUnit: args.obs,
      difference: args.difference,
      alpha: alphaPerComparison,
    })
    power = {
      labs: labs.min,
      unitsPerLabArm: args.units,
      obsPerUnit: args.obs,
      power: r.power,
      variance: r.variance,
      df: r.df,
      ncp: r.ncp,
      ceilingPower: r.ceilingPower,
    }
  }
  let cheapestDesign: ThreeLevelDesignOutput | null = null
  let costOptimal: PlanOutput['costOptimal'] = null
  if (args.costUnit !== null && args.costObs !== null) {
    const { remarks, ...planned } = planThreeLevel({
      ...variances,
      difference: args.difference,
      alpha: args.alpha,
      power: args.power,
      arms: args.arms,
      minLabs: labs.min,
      maxLabs: labs.max,
      costPerLab,
      costPerUnit: args.costUnit,
      costPerObs: args.costObs,
      ...(args.maxUnits === null ? {} : { maxUnitsPerLabArm: args.maxUnits }),
      ...(args.maxObs === null ? {} : { maxObsPerUnit: args.maxObs }),
    })
    cheapestDesign = { ...planned, notes: planNotes(remarks) }
    const optimum = costOptimalObsPerUnit({ costPerUnit: args.costUnit, costPerObs: args.costObs, icc })
    const perLab = costOptimalUnitsPerLab({
      ...variances,
      arms: args.arms,
      costPerLab,
      costPerUnit: args.costUnit,
      costPerObs: args.costObs,
      obsPerUnit: cheapestDesign.obsPerUnit,
    })
    costOptimal = {
      ...optimum,
      exact: Number.isFinite(optimum.exact) ? optimum.exact : null,
      unitsPerLab: { ...perLab, exact: Number.isFinite(perLab.exact) ? perLab.exact : null },
    }
  }
  let grid: ThreeLevelGrid | null = null
  if (args.gridUnits && args.gridObs) {
    if (args.gridUnits.length * args.gridObs.length > 10_000)
      throw new CliInputError('--grid-units × --grid-obs: at most 10000 grid points.')
    const at = (k: number, m: number) =>
      threeLevelPower({
        ...variances,
        labs: labs.min,
        unitsPerLabArm: k,
        obsPerUnit: m,
        difference: args.difference,
        alpha: alphaPerComparison,
      })
    const gridUnits = args.gridUnits
    const gridObs = args.gridObs
    grid = {
      labs: labs.min,
      kValues: [...gridUnits],
      mValues: [...gridObs],
      power: gridUnits.map((k) => gridObs.map((m) => at(k, m).power)),
      ceilingPower: at(gridUnits[0], gridObs[0]).ceilingPower,
      alphaPerComparison,
    }
  }

  return {
    inputs: {
      ...plannedInputs(args, { icc, sdTotal, alphaPerComparison, iccLevel: fromData?.unitLevel ?? null }),
      labs: {
        labs,
        design,
        costPerLab,
        labArmVariance,
        labArmVarianceSource,
        labVariance,
        unitVariance: variances.unitVariance,
        residualVariance: variances.residualVariance,
        mapping: fromData?.mapping ?? [],
      },
    },
    power,
    unitsNeeded: null,
    cheapestDesign,
    costOptimal,
    grid,
    engine: { version: ENGINE_VERSION },
  }
}
