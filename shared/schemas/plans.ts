import { z } from 'zod'

/**
 * Experiment plans: how many independent units per arm and observations per unit the next
 * experiment needs, from a finished analysis's variance components or from typed-in values.
 * The server recomputes the result from the inputs on every save; a stored plan keeps both.
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

export const PlanInputs = z
  .object({
    /** ICC of the units that are assigned to arms; ignored (derived) when the spread is given as components. */
    icc: z.number().min(0).max(1),
    spread: PlanSpread,
    /** Smallest difference between two arm means worth detecting, in the response's unit. */
    difference: positive,
    alpha: z.number().gt(0).lt(0.5).default(0.05),
    targetPower: z.number().gt(0.5).lt(1).default(0.8),
    arms: z.number().int().min(2).max(8).default(2),
    costPerUnit: nonNegative,
    costPerObs: nonNegative,
    maxUnitsPerArm: z.number().int().min(2).max(100_000).nullable().default(null),
    maxObsPerUnit: z.number().int().min(1).max(100_000).nullable().default(null),
  })
  .refine((i) => i.costPerUnit > 0 || i.costPerObs > 0, {
    error: 'Give a cost per unit or per observation (at least one above 0)',
    path: ['costPerUnit'],
  })
export type PlanInputs = z.infer<typeof PlanInputs>
export type PlanInputsInput = z.input<typeof PlanInputs>

export const PlanCurve = z.object({
  obsPerUnit: z.number().int().positive(),
  points: z.array(z.object({ unitsPerArm: z.number().int(), power: z.number().min(0).max(1) })),
})
export type PlanCurve = z.infer<typeof PlanCurve>

export const PlanResult = z.object({
  /** ICC and total SD the computation used (derived from components when those were given). */
  icc: z.number(),
  sdTotal: z.number(),
  feasible: z.boolean(),
  unitsPerArm: z.number().int(),
  obsPerUnit: z.number().int(),
  totalUnits: z.number().int(),
  totalObs: z.number().int(),
  cost: z.number(),
  power: z.number().min(0).max(1),
  alphaPerComparison: z.number(),
  designEffect: z.number(),
  /** Observations per design effect: what one unit is worth in independent observations. */
  effectivePerUnit: z.number(),
  /** Cost-optimal observations per unit m* before rounding; null without a finite optimum. */
  mStar: z.number().nullable(),
  notes: z.array(z.string()),
  /** Power against units per arm for several observations per unit. */
  powerCurves: z.array(PlanCurve),
  /** At the recommended units per arm: power and effective observations per unit as m grows. */
  obsCurve: z.array(
    z.object({ obsPerUnit: z.number().int(), power: z.number().min(0).max(1), effectivePerUnit: z.number() }),
  ),
  /** A few designs around the recommendation, for the table to copy. */
  table: z.array(
    z.object({
      unitsPerArm: z.number().int(),
      obsPerUnit: z.number().int(),
      power: z.number(),
      cost: z.number(),
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
  inputs: PlanInputs,
  /** The observed difference of the first mixed-model contrast, null without a condition. */
  observedDifference: z.number().nullable(),
  /** Units per arm in the analysed data, a hint of how certain the ICC is. */
  unitsInData: z.number().int(),
  meanObsPerUnit: z.number(),
})
export type PlanDefaults = z.infer<typeof PlanDefaults>

/** The recommendation of a plan without its curves and tables: what a summary or a report shows. */
export const PlanRecommendation = PlanResult.pick({
  feasible: true,
  unitsPerArm: true,
  obsPerUnit: true,
  totalUnits: true,
  totalObs: true,
  power: true,
  cost: true,
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
