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

export interface PlanListFilter {
  labId?: number
  projectId?: number
  /** Plans saved from this analysis (and, with versionNo, from that version only). */
  analysisId?: number
  versionNo?: number
}

export function listPlans(query: PlanListFilter = {}): Promise<Plan[]> {
  const params = new URLSearchParams()
  for (const key of ['labId', 'projectId', 'analysisId', 'versionNo'] as const) {
    const value = query[key]
    if (value !== undefined) params.set(key, String(value))
  }
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
