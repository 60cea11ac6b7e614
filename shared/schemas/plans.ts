import { z } from 'zod'

/**
 * Experiment plans: how many labs (or days, plates: the outer level), units per lab and arm and
 * observations per unit the next experiment needs, from a finished analysis's variance components
 * or from typed-in values. The server recomputes the result from the inputs on every save; a
 * stored plan keeps both.
 *
 * Plans saved before the outer level existed stay readable as they are stored: every field added
 * since has a default that reads an old plan as what it was, a plan for one lab (one lab, no lab
 * cost, no lab × arm variance; units per arm are then units per lab and arm). The stored JSON is
 * never rewritten.
 *
 * Costs are optional: with none given (every cost null) the plan counts instead, keeping the number
 * of independent units as small as it can (planFewestUnits). Plans saved before that always had
 * costs, and read as they were.
 */

const Id = z.coerce.number().int().positive()
const positive = z.number().finite().positive()
const nonNegative = z.number().finite().nonnegative()

/** Either the total SD of one observation, or the SDs between units and within units. */
export const PlanSpread = z.discriminatedUnion('kind', [
  z.object({ kind: z.literal('total'), sdTotal: positive }),
  z.object({ kind: z.literal('components'), sdBetween: nonNegative, sdWithin: positive }),
])
export type PlanSpread = z.infer<typeof PlanSpread>

/** How the condition meets the outer level: every lab runs every arm, or each lab runs one arm. */
export const PlanLabDesign = z.enum(['every-arm', 'one-arm'])
export type PlanLabDesign = z.infer<typeof PlanLabDesign>

const LabCount = z.number().int().min(1).max(200)

/**
 * The outer level (labs, days, plates): its name, how many (a fixed number or a range to search),
 * what one costs, and how much it varies. With one lab the plan is the two-level plan of old.
 */
export const PlanOuterLevel = z
  .object({
    /** The outer level's own name, singular: "lab", "day", "plate". */
    name: z.string().trim().min(1).max(60).default('lab'),
    /** 'every-arm': every lab runs every arm (units are assigned within labs); 'one-arm': each lab runs one arm. */
    design: PlanLabDesign.default('every-arm'),
    /** Fewest and most labs to consider (labs per arm for 'one-arm'); equal for a fixed number. */
    minLabs: LabCount.default(1),
    maxLabs: LabCount.default(1),
    /** Cost of one more lab (set-up, travel, shipping), on the scale of the other costs; null: none given. */
    costPerLab: nonNegative.nullable().default(null),
    /**
     * 'every-arm': how much the effect (the difference between two arms) differs from lab to lab,
     * as an SD: √(2 σ²_lab×arm). Null: unknown, planned as 0 with a caution (optimistic).
     */
    effectSd: nonNegative.nullable().default(null),
    /** 'one-arm': SD between labs of a lab's mean in one arm, √(σ²_lab + σ²_lab×arm). Null: unknown, planned as 0. */
    sdBetweenLabs: nonNegative.nullable().default(null),
  })
  .refine((o) => o.minLabs <= o.maxLabs, {
    error: 'The fewest labs must not be more than the most labs',
    path: ['maxLabs'],
  })
export type PlanOuterLevel = z.infer<typeof PlanOuterLevel>

/** The outer level of a plan saved before it existed, and of a plan for one lab. */
export const SINGLE_LAB: PlanOuterLevel = {
  name: 'lab',
  design: 'every-arm',
  minLabs: 1,
  maxLabs: 1,
  costPerLab: null,
  effectSd: null,
  sdBetweenLabs: null,
}

/**
 * What the arms are compared on. 'mean' (every plan saved before, and a normal response): the
 * spread and the difference are in the response's unit. 'proportion' (a yes/no response) or
 * 'rate' (a count): the plan is for a difference in proportions or rates between two arms, given
 * the control arm's proportion (or rate) and the ICC of the units on the latent scale, as a
 * logistic or Poisson mixed model reports it; the ICC and SD on the observations' scale are
 * derived from those (see resolveSpread) and the typed-in spread is not used.
 */
export const PlanMeasure = z.discriminatedUnion('kind', [
  z.object({ kind: z.literal('mean') }),
  z.object({
    kind: z.literal('proportion'),
    /** Proportion of yes in the control (reference) arm. */
    control: z.number().gt(0).lt(1),
    /** ICC of the units on the latent (log-odds) scale: σ²_u / (σ²_u + π²/3). */
    latentIcc: z.number().min(0).lt(1),
  }),
  z.object({
    kind: z.literal('rate'),
    /** Mean count per observation in the control arm. */
    control: positive,
    /** ICC of the units on the latent (log) scale at the control rate λ: σ²_u / (σ²_u + ln(1 + 1/λ)). */
    latentIcc: z.number().min(0).lt(1),
  }),
])
export type PlanMeasure = z.infer<typeof PlanMeasure>

const PlanInputsShape = z.object({
  /** ICC of the units that are assigned to arms; ignored (derived) when the spread is given as components. */
  icc: z.number().min(0).max(1),
  spread: PlanSpread,
  /**
   * Smallest difference between two arm means worth detecting, in the response's unit: the
   * difference that matters biologically, which the person planning gives (never an observed one).
   */
  difference: positive,
  alpha: z.number().gt(0).lt(0.5).default(0.05),
  targetPower: z.number().gt(0.5).lt(1).default(0.8),
  arms: z.number().int().min(2).max(8).default(2),
  /** Costs on one scale of the person's choosing; all null: no costs, the plan counts units. */
  costPerUnit: nonNegative.nullable().default(null),
  costPerObs: nonNegative.nullable().default(null),
  /** Limit on units per lab and arm (with one lab: per arm, at least 2). */
  maxUnitsPerArm: z.number().int().min(1).max(100_000).nullable().default(null),
  maxObsPerUnit: z.number().int().min(1).max(100_000).nullable().default(null),
  /** The outer level; absent in plans saved before it existed, which were plans for one lab. */
  outer: PlanOuterLevel.default(SINGLE_LAB),
  /** What the arms are compared on; absent in plans saved before, which compared means. */
  measure: PlanMeasure.default({ kind: 'mean' }),
})

/** Whether the inputs give costs: a cost per unit or per observation (a cost per lab alone is not enough). */
export function hasCosts(i: { costPerUnit?: number | null; costPerObs?: number | null }): boolean {
  return (i.costPerUnit ?? null) !== null || (i.costPerObs ?? null) !== null
}

export const PlanInputs = PlanInputsShape.refine(
  (i) => !hasCosts(i) || (i.costPerUnit ?? 0) > 0 || (i.costPerObs ?? 0) > 0,
  {
    error: 'Give a cost per unit or per observation above 0, or leave the costs empty to count units instead',
    path: ['costPerUnit'],
  },
)
  .refine((i) => hasCosts(i) || i.outer.costPerLab === null || i.outer.costPerLab === 0, {
    error: 'A cost per lab needs a cost per unit or per observation beside it',
    path: ['costPerUnit'],
  })
  .refine((i) => i.maxUnitsPerArm === null || i.maxUnitsPerArm >= 2 || i.outer.maxLabs > 1, {
    error: 'With one lab, allow at least 2 units per arm',
    path: ['maxUnitsPerArm'],
  })
  .refine((i) => i.measure.kind !== 'proportion' || i.measure.control + i.difference < 1, {
    error: 'The control proportion plus the difference must stay below 1',
    path: ['difference'],
  })
export type PlanInputs = z.infer<typeof PlanInputs>
export type PlanInputsInput = z.input<typeof PlanInputs>

/**
 * The planner's form before the person has said what difference matters: the same numbers, with
 * the difference still empty (null). An analysis suggests this shape, never a difference.
 */
export const PlanDraftInputs = PlanInputsShape.extend({ difference: positive.nullable() })
export type PlanDraftInputs = z.infer<typeof PlanDraftInputs>
export type PlanDraftInput = z.input<typeof PlanDraftInputs>

export const PlanCurve = z.object({
  obsPerUnit: z.number().int().positive(),
  /** unitsPerArm: units per lab and arm (per arm with one lab). */
  points: z.array(z.object({ unitsPerArm: z.number().int(), power: z.number().min(0).max(1) })),
})
export type PlanCurve = z.infer<typeof PlanCurve>

/**
 * Power with one number of labs: against units per lab and arm (at the recommended observations
 * per unit) and against observations per unit (at the recommended units per lab), with the most
 * those labs can reach however many units and observations they use.
 */
export const PlanLabCurve = z.object({
  labs: z.number().int().positive(),
  ceilingPower: z.number().min(0).max(1),
  byUnits: z.array(z.object({ unitsPerArm: z.number().int(), power: z.number().min(0).max(1) })),
  byObs: z.array(z.object({ obsPerUnit: z.number().int(), power: z.number().min(0).max(1) })),
})
export type PlanLabCurve = z.infer<typeof PlanLabCurve>

export const PlanResult = z.object({
  /**
   * Proportion and rate plans: the two arms' proportions (or rates) and the latent ICC the ICC and
   * SD below were derived from; absent for a plan of means.
   */
  measure: z
    .object({
      kind: z.enum(['proportion', 'rate']),
      control: z.number(),
      target: z.number(),
      latentIcc: z.number(),
    })
    .optional(),
  /** ICC and total SD inside a lab and arm the computation used (derived from components when those were given). */
  icc: z.number(),
  sdTotal: z.number(),
  feasible: z.boolean(),
  /** Labs (labs per arm when each lab runs one arm); 1 for a plan for one lab. */
  labs: z.number().int().positive().default(1),
  design: PlanLabDesign.default('every-arm'),
  /** Labs to run in all: labs, or arms · labs when each lab runs one arm. */
  totalLabs: z.number().int().positive().default(1),
  /** Units per lab and arm (with one lab: units per arm). */
  unitsPerArm: z.number().int(),
  obsPerUnit: z.number().int(),
  totalUnits: z.number().int(),
  totalObs: z.number().int(),
  /** Total cost on the costs' scale; null without costs. */
  cost: z.number().nullable(),
  power: z.number().min(0).max(1),
  alphaPerComparison: z.number(),
  designEffect: z.number(),
  /**
   * 'cost': the cheapest design for the costs given; 'counts': no costs were given, the fewest
   * independent units (then observations) reaching the target. Plans saved before it: 'cost'.
   */
  objective: z.enum(['cost', 'counts']).default('cost'),
  /** Observations per design effect: what one unit is worth in independent observations. */
  effectivePerUnit: z.number(),
  /** Cost-optimal observations per unit m* before rounding; null without a finite optimum. */
  mStar: z.number().nullable(),
  /** Cost-optimal units per lab and arm at the recommended m, before rounding; null without a finite optimum. */
  kStar: z.number().nullable().default(null),
  /** Degrees of freedom of the planned test (L − 1 across labs, 2(k − 1) with one lab); null in old plans. */
  df: z.number().nullable().default(null),
  /** σ²_lab×arm the plan used (σ²_lab + σ²_lab×arm when each lab runs one arm). */
  labArmVariance: z.number().nonnegative().default(0),
  /** True when that variance was unknown and planned as 0: the plan is then optimistic. */
  labArmVarianceAssumed: z.boolean().default(false),
  /** The most the recommended labs can reach, however many units and observations; 1 without a limit. */
  ceilingPower: z.number().min(0).max(1).default(1),
  /** Fewest labs whose ceiling reaches the target power; null when more than 10 000 would be needed. */
  fewestLabs: z.number().int().positive().nullable().default(1),
  notes: z.array(z.string()),
  /** Power against units per lab and arm for several observations per unit, at the recommended labs. */
  powerCurves: z.array(PlanCurve),
  /** Power for several numbers of labs, each with its ceiling; empty for a plan for one lab. */
  labCurves: z.array(PlanLabCurve).default([]),
  /** At the recommended units per arm: power and effective observations per unit as m grows. */
  obsCurve: z.array(
    z.object({ obsPerUnit: z.number().int(), power: z.number().min(0).max(1), effectivePerUnit: z.number() }),
  ),
  /** A few designs around the recommendation, for the table to copy. */
  table: z.array(
    z.object({
      labs: z.number().int().positive().default(1),
      unitsPerArm: z.number().int(),
      obsPerUnit: z.number().int(),
      power: z.number(),
      cost: z.number().nullable(),
      recommended: z.boolean(),
    }),
  ),
  engineVersion: z.string(),
})
export type PlanResult = z.infer<typeof PlanResult>

/** Where the plan's numbers came from. */
export const PlanSource = z.object({
  analysisId: Id,
  versionNo: Id,
})
export type PlanSource = z.infer<typeof PlanSource>

export const PlanCreate = z.object({
  labId: Id,
  projectId: Id.nullable().default(null),
  name: z.string().trim().min(1, { error: 'Give the plan a name' }).max(200),
  source: PlanSource.nullable().default(null),
  inputs: PlanInputs,
})
export type PlanCreate = z.infer<typeof PlanCreate>

export const PlanUpdate = z.object({
  name: z.string().trim().min(1).max(200).optional(),
  projectId: Id.nullable().optional(),
})
export type PlanUpdate = z.infer<typeof PlanUpdate>

export const PlanPreview = z.object({ inputs: PlanInputs })
export type PlanPreview = z.infer<typeof PlanPreview>

export const PlanParams = z.object({ planId: Id })
/** analysisId alone: plans from any version of it; with versionNo: from that version only. */
export const PlanListQuery = z
  .object({
    labId: Id.optional(),
    projectId: Id.optional(),
    analysisId: Id.optional(),
    versionNo: Id.optional(),
  })
  .refine((q) => q.versionNo === undefined || q.analysisId !== undefined, {
    error: 'versionNo needs analysisId',
    path: ['versionNo'],
  })
export type PlanListQuery = z.infer<typeof PlanListQuery>
export const PlanDefaultsQuery = z.object({ analysisId: Id, versionNo: Id })

export const Plan = z.object({
  id: z.number().int(),
  labId: z.number().int(),
  labName: z.string(),
  project: z.object({ id: z.number().int(), name: z.string() }).nullable(),
  source: z
    .object({ analysisId: z.number().int(), versionNo: z.number().int(), analysisName: z.string() })
    .nullable(),
  name: z.string(),
  inputs: PlanInputs,
  result: PlanResult,
  createdBy: z.object({ id: z.number().int(), name: z.string() }),
  createdAt: z.string(),
  updatedAt: z.string(),
  permissions: z.object({ write: z.boolean() }),
})
export type Plan = z.infer<typeof Plan>

/** Inputs a finished analysis suggests, with where each number came from. */
export const PlanDefaults = z.object({
  source: z.object({ analysisId: z.number().int(), versionNo: z.number().int(), analysisName: z.string() }),
  labId: z.number().int(),
  projectId: z.number().int(),
  /** The level whose units were assigned to conditions (its ICC is used), e.g. "mouse". */
  unitLevel: z.string(),
  responseName: z.string(),
  /** Everything but the difference, which the person gives, and the costs, left empty. */
  inputs: PlanDraftInputs,
  /**
   * The first mixed-model contrast as a reference beside the difference field: what it compares,
   * its 95 % interval and p. A binary or count analysis gives the difference of the two arms'
   * plain proportions or rates, without an interval, and the model's p for that comparison.
   * Null without a condition (and in answers of older servers).
   */
  observed: z
    .object({
      what: z.string(),
      estimate: z.number(),
      ci: z.tuple([z.number(), z.number()]).nullable(),
      p: z.number(),
    })
    .nullable()
    .default(null),
  /** Units per arm in the analysed data, a hint of how certain the ICC is. */
  unitsInData: z.number().int(),
  meanObsPerUnit: z.number(),
  /** The outer level of the data (e.g. "lab"), null when the plan is for one lab. */
  outerLevel: z.string().nullable().default(null),
  /** Units of the outer level in the analysed data, a hint of how certain its variance is. */
  labsInData: z.number().int().nullable().default(null),
  /**
   * Where the lab × arm variance came from: 'analysis' (its estimate), 'unknown' (an analysis
   * without that term, e.g. engine 0.1: planned as 0 until someone types a value), 'not-needed'.
   */
  labArmVarianceSource: z.enum(['analysis', 'unknown', 'not-needed']).default('not-needed'),
  /** How the analysis's variance components were put on the three levels, in plain words. */
  mapping: z.array(z.string()).default([]),
})
export type PlanDefaults = z.infer<typeof PlanDefaults>

/** The recommendation of a plan without its curves and tables: what a summary or a report shows. */
export const PlanRecommendation = PlanResult.pick({
  feasible: true,
  labs: true,
  design: true,
  totalLabs: true,
  ceilingPower: true,
  unitsPerArm: true,
  obsPerUnit: true,
  totalUnits: true,
  totalObs: true,
  power: true,
  cost: true,
  objective: true,
  designEffect: true,
})
export type PlanRecommendation = z.infer<typeof PlanRecommendation>

/**
 * A saved plan as a reader outside the lab may see it (share link, printed report): no ids, no
 * people, no lab. A full Plan fits this shape too, so one summary component shows both.
 */
export const PlanSummary = z.object({
  name: z.string(),
  createdAt: z.string(),
  inputs: PlanInputs,
  result: PlanRecommendation,
})
export type PlanSummary = z.infer<typeof PlanSummary>
