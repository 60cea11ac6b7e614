import type { Knex } from 'knex'
import { computePlan } from '../shared/planning/compute-plan'
import { roundInputs } from '../shared/planning/round-inputs'
import { suggestPlanInputs } from '../shared/planning/suggest-plan-inputs'
import type { AnalysisResult } from '../shared/schemas/analysis-result'
import { PlanInputs } from '../shared/schemas/plans'
import { insertPlan } from '../server/repositories/plans.repo'

/** The demo's saved plan: made from the single-lab analysis, so its result page, print and links show one. */
const DEMO_PLAN = {
  analysisName: 'Neurite length, NW-117 vs vehicle',
  labSlug: 'nimbus-neurite-lab',
  authorEmail: 'sami@example.org',
  name: 'Follow-up outgrowth run, NW-117 vs vehicle',
  /** Invented: the change in neurite length (µm) the lab would call biologically meaningful. */
  difference: 15,
  /** Invented prices: a mouse through the whole protocol, and one traced neuron. */
  costPerUnit: 400,
  costPerObs: 3,
}

/**
 * One plan from version 1 of the single-lab demo analysis, with the inputs the planner suggests from
 * it and the engine's answer. Idempotent: left alone when that version already has a plan of this
 * name. Runs after 03-demo-analyses.
 */
export async function seed(knex: Knex): Promise<void> {
  const version = await knex('analysis_versions as v')
    .join('analyses as a', 'a.id', 'v.analysis_id')
    .join('labs as l', 'l.id', 'a.lab_id')
    .where({ 'l.slug': DEMO_PLAN.labSlug, 'a.name': DEMO_PLAN.analysisName, 'v.version_no': 1 })
    .first('v.id', 'v.status', 'v.result', 'a.lab_id', 'a.project_id')
  if (!version) throw new Error(`the demo plan needs the demo analysis “${DEMO_PLAN.analysisName}” (seed 03)`)
  if (version.status !== 'done' || !version.result) return
  if (await knex('plans').where({ analysis_version_id: version.id, name: DEMO_PLAN.name }).first('id')) return

  const suggested = suggestPlanInputs(version.result as AnalysisResult)
  if (!suggested) return
  // Rounded as the planner form rounds the numbers it suggests.
  const inputs = PlanInputs.parse({
    ...roundInputs(suggested.inputs),
    difference: DEMO_PLAN.difference,
    costPerUnit: DEMO_PLAN.costPerUnit,
    costPerObs: DEMO_PLAN.costPerObs,
  })
  const author = await knex('users').where({ email: DEMO_PLAN.authorEmail }).first('id')
  await insertPlan(
    {
      labId: version.lab_id,
      projectId: version.project_id,
      analysisVersionId: version.id,
      name: DEMO_PLAN.name,
      inputs,
      result: computePlan(inputs),
      createdBy: author.id,
    },
    knex,
  )
}
