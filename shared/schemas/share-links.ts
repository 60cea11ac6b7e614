import { z } from 'zod'
import { AnalysisSettings, ChartData } from './analyses'
import { AnalysisResult } from './analysis-result'
import { Email } from './auth'
import { PlanSummary } from './plans'

export const SHARE_LINK_DEFAULT_DAYS = 30
export const SHARE_LINK_MAX_DAYS = 365

const Person = z.object({ id: z.number().int(), name: z.string() })

export const ShareLinkCreate = z.object({
  versionNo: z.number().int().positive(),
  expiresInDays: z.number().int().min(1).max(SHARE_LINK_MAX_DAYS).default(SHARE_LINK_DEFAULT_DAYS),
  allowUnitTable: z.boolean().default(false),
  note: z.string().trim().max(200).default(''),
  /** Mail the link to this address as well (optional). */
  mailTo: Email.optional(),
})
export type ShareLinkCreate = z.infer<typeof ShareLinkCreate>

export const ShareLinkStatus = z.enum(['active', 'expired', 'revoked'])
export type ShareLinkStatus = z.infer<typeof ShareLinkStatus>

export const ShareLink = z.object({
  id: z.number().int().positive(),
  analysisId: z.number().int().positive(),
  versionNo: z.number().int().positive(),
  allowUnitTable: z.boolean(),
  note: z.string(),
  createdBy: Person,
  createdAt: z.string(),
  expiresAt: z.string(),
  revokedAt: z.string().nullable(),
  status: ShareLinkStatus,
  openCount: z.number().int().nonnegative(),
  lastOpenedAt: z.string().nullable(),
})
export type ShareLink = z.infer<typeof ShareLink>

/** Only the answer to creating a link holds the link: the server keeps its hash alone. */
export const CreatedShareLink = ShareLink.extend({ url: z.string(), token: z.string() })
export type CreatedShareLink = z.infer<typeof CreatedShareLink>

export const ShareLinkParams = z.object({
  analysisId: z.coerce.number().int().positive(),
  linkId: z.coerce.number().int().positive(),
})
export type ShareLinkParams = z.infer<typeof ShareLinkParams>

export const SharedTokenParams = z.object({ token: z.string().regex(/^[A-Za-z0-9_-]{43}$/) })
export type SharedTokenParams = z.infer<typeof SharedTokenParams>

/** What a link holder sees: one version's result, nothing that leads elsewhere. */
export const SharedAnalysis = z.object({
  analysisName: z.string(),
  labName: z.string(),
  versionNo: z.number().int().positive(),
  finishedAt: z.string().nullable(),
  engineVersion: z.string(),
  datasetSha256: z.string(),
  /** The version's settings in today's shape (settings stored by engine 0.1 are upgraded on the way out). */
  settings: AnalysisSettings,
  result: AnalysisResult,
  chart: ChartData,
  allowUnitTable: z.boolean(),
  expiresAt: z.string(),
  signedOff: z.boolean(),
  /** Plans saved from this very version, oldest first. */
  plans: z.array(PlanSummary),
})
export type SharedAnalysis = z.infer<typeof SharedAnalysis>
