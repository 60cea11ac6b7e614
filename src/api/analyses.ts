import type {
  AnalysisCreate,
  AnalysisDefaults,
  AnalysisDetail,
  AnalysisListItem,
  AnalysisListQuery,
  AnalysisVersionCreate,
  AnalysisVersionDetail,
  AnalysisVersionStatus,
  AnalysisVersionSummary,
} from '../../shared/schemas/analyses'
import { request } from './http'

const base = '/api/v1/analyses'
const versionPath = (analysisId: number, versionNo: number) => `${base}/${analysisId}/versions/${versionNo}`

function query(params: Record<string, number | undefined>): string {
  const search = new URLSearchParams()
  for (const [key, value] of Object.entries(params)) if (value !== undefined) search.set(key, String(value))
  const text = search.toString()
  return text ? `?${text}` : ''
}

export function listAnalyses(filter: AnalysisListQuery = {}): Promise<AnalysisListItem[]> {
  return request<AnalysisListItem[]>(`${base}${query({ ...filter })}`)
}

export function getDefaults(datasetId: number, datasetVersionNo?: number): Promise<AnalysisDefaults> {
  return request<AnalysisDefaults>(`${base}/defaults${query({ datasetId, datasetVersionNo })}`)
}

export function createAnalysis(input: AnalysisCreate): Promise<AnalysisDetail> {
  return request<AnalysisDetail>(base, { method: 'POST', body: input })
}

export function getAnalysis(analysisId: number): Promise<AnalysisDetail> {
  return request<AnalysisDetail>(`${base}/${analysisId}`)
}

export function renameAnalysis(analysisId: number, name: string): Promise<AnalysisDetail> {
  return request<AnalysisDetail>(`${base}/${analysisId}`, { method: 'PATCH', body: { name } })
}

export function createVersion(
  analysisId: number,
  input: AnalysisVersionCreate,
): Promise<AnalysisVersionSummary> {
  return request<AnalysisVersionSummary>(`${base}/${analysisId}/versions`, { method: 'POST', body: input })
}

export function getVersion(analysisId: number, versionNo: number): Promise<AnalysisVersionDetail> {
  return request<AnalysisVersionDetail>(versionPath(analysisId, versionNo))
}

export function getVersionStatus(
  analysisId: number,
  versionNo: number,
  signal?: AbortSignal,
): Promise<AnalysisVersionStatus> {
  return request<AnalysisVersionStatus>(`${versionPath(analysisId, versionNo)}/status`, { signal })
}

/** Where the browser downloads the unit-level summary (the server neutralises formula-like cells). */
export function unitsCsvUrl(analysisId: number, versionNo: number): string {
  return `${versionPath(analysisId, versionNo)}/units.csv`
}

/** Where the browser downloads "check it in R": the script and the exact rows it reads. */
export function rExportUrls(analysisId: number, versionNo: number): { script: string; rows: string } {
  const base = `${versionPath(analysisId, versionNo)}/r`
  return { script: `${base}/script.R`, rows: `${base}/rows.csv` }
}
