import { computePlan } from '../../shared/planning/compute-plan'
import { suggestPlanInputs } from '../../shared/planning/suggest-plan-inputs'
import type { CurrentUser } from '../../shared/schemas/auth'
import type {
  Plan,
  PlanCreate,
  PlanDefaults,
  PlanInputs,
  PlanListQuery,
  PlanResult,
  PlanUpdate,
} from '../../shared/schemas/plans'
import { EngineInputError } from '../../shared/stats/engine-input-error'
import { db } from '../db'
import { NotFoundError, UnprocessableError } from '../errors/app-error'
import { findAnalysisVersion, findAnalysisVersionResult } from '../repositories/analyses.repo'
import { findProject } from '../repositories/projects.repo'
import { deletePlan, insertPlan, listPlans, updatePlan, type PlanRecord } from '../repositories/plans.repo'
import { recordAudit } from './audit.service'
import { canWrite, readableLabIds } from '../../shared/access'
import { readable, writable } from '../access/records'

/**
 * Experiment plans. Lab members read a lab's plans; scientists and PIs create, rename, attach and
 * delete them; ids outside the caller's labs are 404. The result is always computed here from the
 * inputs with the engine's planning functions.
 */

function toPublic(user: CurrentUser, plan: PlanRecord): Plan {
  return { ...plan, permissions: { write: canWrite(user, plan.labId) } }
}

/** The engine's answer, or 422 with its message for inputs no design can satisfy. */
export function previewPlan(inputs: PlanInputs): PlanResult {
  try {
    return computePlan(inputs)
  } catch (error) {
    if (error instanceof EngineInputError) throw new UnprocessableError(error.message)
    throw error
  }
}

async function projectInLab(projectId: number | null, labId: number): Promise<number | null> {
  if (projectId === null) return null
  const project = await findProject(projectId)
  if (!project || project.labId !== labId) throw new NotFoundError('Project not found in this lab.')
  return project.id
}

/** A finished analysis version the user may read, with its stored result. */
async function finishedVersion(user: CurrentUser, analysisId: number, versionNo: number) {
  const analysis = await readable(user, 'analysis', analysisId)
  const version = await findAnalysisVersion(analysisId, versionNo)
  if (!version) throw new NotFoundError(`Version ${versionNo} of this analysis not found.`)
  const { result } =
    version.status === 'done' ? await findAnalysisVersionResult(version.id) : { result: null }
  if (!result)
    throw new UnprocessableError('This analysis version has not finished; plan from a finished one.')
  return { analysis, version, result }
}

/** Inputs a finished analysis version suggests (see suggestPlanInputs), with where they came from. */
export async function planDefaultsFor(
  user: CurrentUser,
  analysisId: number,
  versionNo: number,
): Promise<PlanDefaults> {
  const { analysis, result } = await finishedVersion(user, analysisId, versionNo)
  const suggested = suggestPlanInputs(result)
  if (!suggested) throw new UnprocessableError('This analysis found no variation to plan with.')
  return {
    source: { analysisId, versionNo, analysisName: analysis.name },
    labId: analysis.labId,
    projectId: analysis.project.id,
    ...suggested,
  }
}

export async function listPlansFor(user: CurrentUser, query: PlanListQuery): Promise<Plan[]> {
  let labIds = readableLabIds(user)
  if (query.labId !== undefined) labIds = labIds.filter((id) => id === query.labId)
  const plans = await listPlans({
    labIds,
    projectId: query.projectId,
    analysisId: query.analysisId,
    versionNo: query.versionNo,
  })
  return plans.map((plan) => toPublic(user, plan))
}

export async function getPlanFor(user: CurrentUser, planId: number): Promise<Plan> {
  return toPublic(user, await readable(user, 'plan', planId))
}

export async function createPlanFor(user: CurrentUser, input: PlanCreate): Promise<Plan> {
  await writable(user, 'lab', input.labId, { subject: 'plan' })
  const projectId = await projectInLab(input.projectId, input.labId)
  let analysisVersionId: number | null = null
  if (input.source) {
    const { analysis, version } = await finishedVersion(user, input.source.analysisId, input.source.versionNo)
    if (analysis.labId !== input.labId) throw new NotFoundError('Analysis not found in this lab.')
    analysisVersionId = version.id
  }
  const result = previewPlan(input.inputs)
  const id = await db.transaction(async (trx) => {
    const planId = await insertPlan(
      {
        labId: input.labId,
        projectId,
        analysisVersionId,
        name: input.name,
        inputs: input.inputs,
        result,
        createdBy: user.id,
      },
      trx,
    )
    await recordAudit(trx, {
      action: 'plan.created',
      actorUserId: user.id,
      labId: input.labId,
      subjectType: 'plan',
      subjectId: planId,
      details: {
        name: input.name,
        projectId,
        ...(input.source ? { analysisId: input.source.analysisId, versionNo: input.source.versionNo } : {}),
        labs: result.labs,
        unitsPerArm: result.unitsPerArm,
        obsPerUnit: result.obsPerUnit,
      },
    })
    return planId
  })
  return getPlanFor(user, id)
}

export async function updatePlanFor(user: CurrentUser, planId: number, changes: PlanUpdate): Promise<Plan> {
  const plan = await writable(user, 'plan', planId)
  const projectId =
    changes.projectId === undefined ? undefined : await projectInLab(changes.projectId, plan.labId)
  await db.transaction(async (trx) => {
    await updatePlan(planId, { name: changes.name, projectId }, trx)
    await recordAudit(trx, {
      action: 'plan.updated',
      actorUserId: user.id,
      labId: plan.labId,
      subjectType: 'plan',
      subjectId: planId,
      details: changedFields(plan, { name: changes.name, projectId }),
    })
  })
  return getPlanFor(user, planId)
}

/** Old and new value of each field a rename or move touches; unchanged fields are left out. */
function changedFields(
  plan: PlanRecord,
  changes: { name?: string; projectId?: number | null },
): Record<string, { from: unknown; to: unknown }> {
  const changed: Record<string, { from: unknown; to: unknown }> = {}
  if (changes.name !== undefined && changes.name !== plan.name)
    changed.name = { from: plan.name, to: changes.name }
  const projectBefore = plan.project?.id ?? null
  if (changes.projectId !== undefined && changes.projectId !== projectBefore)
    changed.projectId = { from: projectBefore, to: changes.projectId }
  return changed
}

export async function deletePlanFor(user: CurrentUser, planId: number): Promise<void> {
  const plan = await writable(user, 'plan', planId)
  await db.transaction(async (trx) => {
    await deletePlan(planId, trx)
    await recordAudit(trx, {
      action: 'plan.deleted',
      actorUserId: user.id,
      labId: plan.labId,
      subjectType: 'plan',
      subjectId: planId,
      details: { name: plan.name, ...(plan.source ?? {}) },
    })
  })
}
