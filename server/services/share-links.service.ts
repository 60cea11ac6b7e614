import { createHmac } from 'node:crypto'
import type { CurrentUser } from '../../shared/schemas/auth'
import { AnalysisSettings } from '../../shared/schemas/analyses'
import { PlanRecommendation, type PlanSummary } from '../../shared/schemas/plans'
import type {
  CreatedShareLink,
  ShareLink,
  ShareLinkCreate,
  SharedAnalysis,
} from '../../shared/schemas/share-links'
import { csvFilename, unitsCsv } from '../analysis/units-csv'
import { config, publicUrl } from '../config'
import { currentRequestFacts } from '../middleware/audit-context'
import { db } from '../db'
import { ConflictError, NotFoundError } from '../errors/app-error'
import { shareLinkMail } from '../mail/templates/review-mails'
import { findAnalysisVersionResult } from '../repositories/analyses.repo'
import { listPlansOfVersion, type PlanRecord } from '../repositories/plans.repo'
import { findReviewableVersion, findReviewableVersionById } from '../repositories/reviews.repo'
import {
  countShareLinkOpened,
  findShareLink,
  findSharedVersionFacts,
  findUsableShareLinkByHash,
  insertShareLink,
  listShareLinksOfAnalysis,
  markShareLinkRevoked,
  recordShareLinkVisit,
  type ShareLinkRecord,
} from '../repositories/share-links.repo'
import { recordAudit } from './audit.service'
import { canShare } from '../../shared/access'
import { allowOnly, readable } from '../access/records'
import { hashInvitationToken, newInvitationToken } from './invitation-tokens'
import { enqueueMail } from './mail-outbox.service'
import { signOffStateOf } from './reviews.service'

/**
 * Read-only links to one analysis version for people without an account. A PI of the lab or the
 * analysis' author creates and revokes them; every member sees them with how often they were
 * opened. The token is 32 random bytes; only its SHA-256 is stored, so the database alone never
 * yields a working link. A link that is unknown, expired or revoked answers one plain 404.
 */

const DAY_MS = 24 * 60 * 60 * 1000
const GONE = 'This link does not work (it may have expired or been withdrawn).'

export function shareLinkUrl(token: string): string {
  return `${publicUrl.replace(/\/+$/, '')}/s/${token}`
}

function statusOf(link: ShareLinkRecord, now = new Date()): ShareLink['status'] {
  if (link.revokedAt) return 'revoked'
  return link.expiresAt <= now ? 'expired' : 'active'
}

function toShareLink(link: ShareLinkRecord): ShareLink {
  return {
    id: link.id,
    analysisId: link.analysisId,
    versionNo: link.versionNo,
    allowUnitTable: link.allowUnitTable,
    note: link.note,
    createdBy: link.createdBy,
    createdAt: link.createdAt.toISOString(),
    expiresAt: link.expiresAt.toISOString(),
    revokedAt: link.revokedAt ? link.revokedAt.toISOString() : null,
    status: statusOf(link),
    openCount: link.openCount,
    lastOpenedAt: link.lastOpenedAt ? link.lastOpenedAt.toISOString() : null,
  }
}

const SHARE_REFUSAL = 'Only a PI of the lab or the analysis’ author can share or withdraw links.'

export async function listShareLinks(user: CurrentUser, analysisId: number): Promise<ShareLink[]> {
  await readable(user, 'analysis', analysisId)
  return (await listShareLinksOfAnalysis(analysisId)).map(toShareLink)
}

export async function createShareLink(
  user: CurrentUser,
  analysisId: number,
  input: ShareLinkCreate,
): Promise<CreatedShareLink> {
  const analysis = await readable(user, 'analysis', analysisId)
  const version = await findReviewableVersion(analysisId, input.versionNo)
  if (!version) throw new NotFoundError(`Version ${input.versionNo} of this analysis not found.`)
  allowOnly(
    canShare(user, {
      labId: analysis.labId,
      authorIds: [version.analysisCreatedBy, version.versionCreatedBy],
    }),
    SHARE_REFUSAL,
  )
  if (version.status !== 'done') throw new ConflictError('Only a finished version can be shared.')

  const token = newInvitationToken()
  const expiresAt = new Date(Date.now() + input.expiresInDays * DAY_MS)
  const id = await db.transaction(async (trx) => {
    const linkId = await insertShareLink(
      {
        analysisVersionId: version.id,
        tokenHash: hashInvitationToken(token),
        allowUnitTable: input.allowUnitTable,
        note: input.note,
        createdBy: user.id,
        expiresAt,
      },
      trx,
    )
    if (input.mailTo) {
      await enqueueMail(
        trx,
        shareLinkMail({
          to: input.mailTo,
          senderName: user.name,
          analysisName: analysis.name,
          link: shareLinkUrl(token),
          expiresAt,
        }),
      )
    }
    await recordAudit(trx, {
      action: 'share_link.created',
      actorUserId: user.id,
      labId: analysis.labId,
      subjectType: 'share_link',
      subjectId: linkId,
      details: {
        analysisId,
        versionNo: input.versionNo,
        expiresAt: expiresAt.toISOString(),
        allowUnitTable: input.allowUnitTable,
        ...(input.mailTo ? { mailedTo: input.mailTo } : {}),
      },
    })
    return linkId
  })
  return { ...toShareLink((await findShareLink(id))!), url: shareLinkUrl(token), token }
}

export async function revokeShareLink(
  user: CurrentUser,
  analysisId: number,
  linkId: number,
): Promise<ShareLink> {
  const analysis = await readable(user, 'analysis', analysisId)
  return db.transaction(async (trx) => {
    const link = await findShareLink(linkId, trx)
    if (!link || link.analysisId !== analysis.id) throw new NotFoundError('Share link not found.')
    const version = (await findReviewableVersionById(link.analysisVersionId, trx))!
    allowOnly(
      canShare(user, {
        labId: analysis.labId,
        authorIds: [version.analysisCreatedBy, version.versionCreatedBy, link.createdBy.id],
      }),
      SHARE_REFUSAL,
    )
    if (!(await markShareLinkRevoked(link.id, user.id, trx))) {
      throw new ConflictError('This link was already withdrawn.')
    }
    await recordAudit(trx, {
      action: 'share_link.revoked',
      actorUserId: user.id,
      labId: analysis.labId,
      subjectType: 'share_link',
      subjectId: link.id,
      details: { analysisId, versionNo: link.versionNo },
    })
    return toShareLink((await findShareLink(link.id, trx))!)
  })
}

// ---------------------------------------------------------------- the link holder's side

async function usableLink(token: string): Promise<ShareLinkRecord> {
  const link = await findUsableShareLinkByHash(hashInvitationToken(token))
  if (!link) throw new NotFoundError(GONE)
  return link
}

/** A plan as the link holder sees it: numbers and name, nothing about who made it or where it is filed. */
function toSharedPlan(plan: PlanRecord): PlanSummary {
  // The schema's pick decides which numbers leave; parsing drops the curves and tables.
  return {
    name: plan.name,
    createdAt: plan.createdAt,
    inputs: plan.inputs,
    result: PlanRecommendation.parse(plan.result),
  }
}

/**
 * Who opens a link, as far as the server can tell (the client address), keyed with the session
 * secret so the visits table holds no address.
 */
function visitorKey(): string {
  const { ip } = currentRequestFacts()
  return createHmac('sha256', config.SESSION_SECRET)
    .update(ip ?? 'unknown')
    .digest('hex')
    .slice(0, 32)
}

/**
 * What someone holding the link sees. Counts the opening on the link, and records it in the audit
 * log once per visitor and hour.
 */
export async function openSharedAnalysis(token: string): Promise<SharedAnalysis> {
  const link = await usableLink(token)
  const version = await findReviewableVersionById(link.analysisVersionId)
  if (!version || version.status !== 'done') throw new NotFoundError(GONE)
  const [stored, signOff, plans] = await Promise.all([
    findSharedVersionFacts(version.id),
    signOffStateOf(version.analysisId, version.versionNo),
    listPlansOfVersion(version.id),
  ])
  const { result, chart } = stored
  if (!result || !chart) throw new NotFoundError(GONE)
  await db.transaction(async (trx) => {
    await countShareLinkOpened(link.id, trx)
    // Every opening counts on the link; the audit log gets the first of each visitor's hour.
    if (!(await recordShareLinkVisit(link.id, visitorKey(), trx))) return
    await recordAudit(trx, {
      action: 'share_link.opened',
      actorUserId: null,
      labId: version.labId,
      subjectType: 'share_link',
      subjectId: link.id,
      details: { analysisId: version.analysisId, versionNo: version.versionNo },
    })
  })
  return {
    analysisName: version.analysisName,
    labName: version.labName,
    versionNo: version.versionNo,
    finishedAt: stored.finishedAt ? stored.finishedAt.toISOString() : null,
    engineVersion: stored.engineVersion,
    datasetSha256: stored.datasetSha256,
    settings: AnalysisSettings.parse(stored.settings),
    result,
    chart,
    allowUnitTable: link.allowUnitTable,
    expiresAt: link.expiresAt.toISOString(),
    signedOff: signOff.signedOff,
    plans: plans.map(toSharedPlan),
  }
}

/** The unit-level table, only when the link's creator allowed it (404 otherwise, like any unknown path). */
export async function sharedUnitsCsv(token: string): Promise<{ filename: string; body: string }> {
  const link = await usableLink(token)
  if (!link.allowUnitTable) throw new NotFoundError('The unit table is not shared through this link.')
  const version = await findReviewableVersionById(link.analysisVersionId)
  const { result, chart } = await findAnalysisVersionResult(link.analysisVersionId)
  if (!version || !chart) throw new NotFoundError(GONE)
  return { filename: csvFilename(version.analysisName, version.versionNo), body: unitsCsv(chart, result) }
}

/**
 * The version behind a link whose creator allowed the unit table, for exports of its rows (404
 * otherwise, like any unknown path: the rows are at least as private as the unit table).
 */
export async function sharedVersionWithRows(
  token: string,
): Promise<{ analysisId: number; versionNo: number; analysisName: string }> {
  const link = await usableLink(token)
  if (!link.allowUnitTable) throw new NotFoundError('The rows are not shared through this link.')
  const version = await findReviewableVersionById(link.analysisVersionId)
  if (!version || version.status !== 'done') throw new NotFoundError(GONE)
  return { analysisId: version.analysisId, versionNo: version.versionNo, analysisName: version.analysisName }
}
