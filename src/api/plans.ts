import type {
  Plan,
  PlanCreate,
  PlanDefaults,
  PlanInputsInput,
  PlanResult,
  PlanUpdate,
} from '../../shared/schemas/plans'
import type { AgreementResult } from '../../shared/schemas/agreement'
import { request } from './http'

const base = '/api/v1/plans'

export function listPlans(query: { labId?: number; projectId?: number } = {}): Promise<Plan[]> {
  const params = new URLSearchParams()
  if (query.labId !== undefined) params.set('labId', String(query.labId))
  if (query.projectId !== undefined) params.set('projectId', String(query.projectId))
  const text = params.toString()
  return request<Plan[]>(text ? `${base}?${text}` : base)
}

export function getPlan(planId: number): Promise<Plan> {
  return request<Plan>(`${base}/${planId}`)
}

/** Inputs suggested by a finished analysis version. */
export function planDefaults(analysisId: number, versionNo: number): Promise<PlanDefaults> {
  return request<PlanDefaults>(`${base}/defaults?analysisId=${analysisId}&versionNo=${versionNo}`)
}

/** The server computes, nothing is saved. */
export function previewPlan(inputs: PlanInputsInput, signal?: AbortSignal): Promise<PlanResult> {
  return request<PlanResult>(`${base}/preview`, { method: 'POST', body: { inputs }, signal })
}

export function createPlan(input: Omit<PlanCreate, 'inputs'> & { inputs: PlanInputsInput }): Promise<Plan> {
  return request<Plan>(base, { method: 'POST', body: input })
}

export function updatePlan(planId: number, changes: PlanUpdate): Promise<Plan> {
  return request<Plan>(`${base}/${planId}`, { method: 'PATCH', body: changes })
}

export function deletePlan(planId: number): Promise<void> {
  return request<void>(`${base}/${planId}`, { method: 'DELETE' })
}

export function getAgreement(analysisId: number, versionNo: number): Promise<AgreementResult> {
  return request<AgreementResult>(`/api/v1/analyses/${analysisId}/versions/${versionNo}/agreement`)
}
