import type {
  ColumnProfile,
  DatasetDetail,
  DatasetSummary,
  DatasetUpdate,
  DatasetVersionDetail,
  DesignSummary,
  Exclusion,
  ExclusionCreate,
  RowsPage,
  Tagging,
  TaggingInput,
  UploadProgress,
} from '../../shared/schemas/datasets'
import { request } from './http'
import { postMultipart, type TransferProgress } from './upload-request'

const base = '/api/v1/datasets'
/**
 * Same as UPLOAD_TOKEN_HEADER in shared/schemas/datasets (checked by datasets.test.ts); written out
 * here because importing a value from that module would pull zod into the browser bundle.
 */
export const UPLOAD_TOKEN_HEADER = 'x-upload-token'
const versionPath = (datasetId: number, versionNo: number) => `${base}/${datasetId}/versions/${versionNo}`

function query(params: Record<string, string | number | boolean | undefined>): string {
  const search = new URLSearchParams()
  for (const [key, value] of Object.entries(params)) if (value !== undefined) search.set(key, String(value))
  const text = search.toString()
  return text ? `?${text}` : ''
}

export interface DatasetListFilter {
  labId?: number
  projectId?: number
  /** Instance admins only: soft-deleted datasets of every lab. */
  deleted?: boolean
}

export function listDatasets(filter: DatasetListFilter = {}): Promise<DatasetSummary[]> {
  return request<DatasetSummary[]>(`${base}${query({ ...filter, deleted: filter.deleted || undefined })}`)
}

export function getDataset(datasetId: number): Promise<DatasetDetail> {
  return request<DatasetDetail>(`${base}/${datasetId}`)
}

export function updateDataset(datasetId: number, changes: DatasetUpdate): Promise<DatasetDetail> {
  return request<DatasetDetail>(`${base}/${datasetId}`, { method: 'PATCH', body: changes })
}

export function deleteDataset(datasetId: number): Promise<void> {
  return request<void>(`${base}/${datasetId}`, { method: 'DELETE' })
}

export function restoreDataset(datasetId: number): Promise<DatasetSummary> {
  return request<DatasetSummary>(`${base}/${datasetId}/restore`, { method: 'POST' })
}

export function getVersion(datasetId: number, versionNo: number): Promise<DatasetVersionDetail> {
  return request<DatasetVersionDetail>(versionPath(datasetId, versionNo))
}

export function getColumns(datasetId: number, versionNo: number): Promise<ColumnProfile[]> {
  return request<ColumnProfile[]>(`${versionPath(datasetId, versionNo)}/columns`)
}

export interface RowsRequest {
  page: number
  pageSize: number
  sortBy?: string
  sortDesc?: boolean
  show?: 'all' | 'included' | 'excluded'
}

export function getRows(
  datasetId: number,
  versionNo: number,
  rows: RowsRequest,
  signal?: AbortSignal,
): Promise<RowsPage> {
  return request<RowsPage>(`${versionPath(datasetId, versionNo)}/rows${query({ ...rows })}`, { signal })
}

export interface SavedTagging {
  tagging: Tagging
  design: DesignSummary
}

export function saveTagging(
  datasetId: number,
  versionNo: number,
  input: TaggingInput,
): Promise<SavedTagging> {
  return request<SavedTagging>(`${versionPath(datasetId, versionNo)}/tagging`, { method: 'PUT', body: input })
}

/** The saved nesting's design over the rows kept now; 404 while the version has no tagging. */
export function getDesign(datasetId: number, versionNo: number): Promise<DesignSummary> {
  return request<DesignSummary>(`${versionPath(datasetId, versionNo)}/design`)
}

export function listExclusions(datasetId: number, versionNo: number): Promise<Exclusion[]> {
  return request<Exclusion[]>(`${versionPath(datasetId, versionNo)}/exclusions`)
}

export function addExclusion(
  datasetId: number,
  versionNo: number,
  input: ExclusionCreate,
): Promise<Exclusion> {
  return request<Exclusion>(`${versionPath(datasetId, versionNo)}/exclusions`, {
    method: 'POST',
    body: input,
  })
}

export function withdrawExclusion(
  datasetId: number,
  versionNo: number,
  exclusionId: number,
): Promise<Exclusion> {
  return request<Exclusion>(`${versionPath(datasetId, versionNo)}/exclusions/${exclusionId}`, {
    method: 'DELETE',
  })
}

/** Where the browser downloads the original bytes of a version (kept unchanged for reproducibility). */
export function originalFileUrl(datasetId: number, versionNo: number): string {
  return `${versionPath(datasetId, versionNo)}/original`
}

// ---------------------------------------------------------------- uploads

export function getUploadProgress(token: string, signal?: AbortSignal): Promise<UploadProgress> {
  return request<UploadProgress>(`${base}/uploads/${encodeURIComponent(token)}`, { signal })
}

export interface NewDatasetFields {
  labId: number
  projectId?: number
  projectName?: string
  name?: string
  description?: string
  sheet?: string
}

export interface UploadCallbacks {
  /** Token the server files progress under; poll getUploadProgress with it while the upload runs. */
  token: string
  onTransfer?: (progress: TransferProgress) => void
  onSent?: () => void
  signal?: AbortSignal
}

function formWith(file: File, fields: Record<string, string | number | undefined>): FormData {
  const form = new FormData()
  // Text fields first: the server reads them before the file streams in.
  for (const [key, value] of Object.entries(fields)) {
    if (value !== undefined && value !== '') form.append(key, String(value))
  }
  form.append('file', file, file.name)
  return form
}

function uploadOptions(callbacks: UploadCallbacks) {
  return {
    headers: { [UPLOAD_TOKEN_HEADER]: callbacks.token },
    onTransfer: callbacks.onTransfer,
    onSent: callbacks.onSent,
    signal: callbacks.signal,
  }
}

/** Creates a dataset (version 1) from a file; resolves once the rows are stored and profiled. */
export function uploadDataset(
  file: File,
  fields: NewDatasetFields,
  callbacks: UploadCallbacks,
): Promise<DatasetDetail> {
  return postMultipart<DatasetDetail>(base, formWith(file, { ...fields }), uploadOptions(callbacks))
}

/** Adds a new version to a dataset; earlier versions stay as they were. */
export function uploadVersion(
  datasetId: number,
  file: File,
  fields: { sheet?: string },
  callbacks: UploadCallbacks,
): Promise<DatasetVersionDetail> {
  return postMultipart<DatasetVersionDetail>(
    `${base}/${datasetId}/versions`,
    formWith(file, { ...fields }),
    uploadOptions(callbacks),
  )
}

/** A token the server accepts (8–64 of [A-Za-z0-9_-]); random, so two tabs never share one. */
export function newUploadToken(): string {
  const bytes = crypto.getRandomValues(new Uint8Array(16))
  return Array.from(bytes, (b) => b.toString(16).padStart(2, '0')).join('')
}
