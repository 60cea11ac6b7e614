import type { CreatedShareLink, ShareLink, SharedAnalysis } from '../../shared/schemas/share-links'
import { request } from './http'

export interface ShareLinkInput {
  versionNo: number
  expiresInDays?: number
  allowUnitTable?: boolean
  note?: string
  mailTo?: string
}

export function listShareLinks(analysisId: number): Promise<ShareLink[]> {
  return request<ShareLink[]>(`/api/v1/analyses/${analysisId}/share-links`)
}

export function createShareLink(analysisId: number, input: ShareLinkInput): Promise<CreatedShareLink> {
  return request<CreatedShareLink>(`/api/v1/analyses/${analysisId}/share-links`, {
    method: 'POST',
    body: input,
  })
}

export function revokeShareLink(analysisId: number, linkId: number): Promise<ShareLink> {
  return request<ShareLink>(`/api/v1/analyses/${analysisId}/share-links/${linkId}`, { method: 'DELETE' })
}

/** The link holder's view: no account involved. */
export function openShared(token: string): Promise<SharedAnalysis> {
  return request<SharedAnalysis>(`/api/v1/shared/${encodeURIComponent(token)}`)
}

export function sharedUnitsCsvUrl(token: string): string {
  return `/api/v1/shared/${encodeURIComponent(token)}/units.csv`
}

/** "Check it in R" through a link that shares the unit table. */
export function sharedRExportUrls(token: string): { script: string; rows: string } {
  const base = `/api/v1/shared/${encodeURIComponent(token)}/r`
  return { script: `${base}/script.R`, rows: `${base}/rows.csv` }
}
