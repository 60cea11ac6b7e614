import type { CurrentUser } from '../../shared/schemas/auth'
import type {
  ReviewComment,
  ReviewCommentCreate,
  ReviewDecision,
  ReviewRequest,
  ReviewRequestCreate,
  ReviewState,
  SignOff,
  SignOffState,
} from '../../shared/schemas/reviews'
import { publicUrl } from '../config'
import { db } from '../db'
import { ConflictError, InvalidPayloadError } from '../errors/app-error'
import { reviewDecisionMail, reviewRequestMail } from '../mail/templates/review-mails'
import type { Conn } from '../repositories/connection'
import { listMembersOfLab } from '../repositories/memberships.repo'
import {
  findCommentVersionId,
  findReviewableVersion,
  findReviewRequest,
  findSignableContent,
  insertReviewComment,
  insertReviewRequest,
  insertSignOff,
  listCommentsOfVersion,
  listRequestsForReviewer,
  listRequestsOfVersion,
  listSignOffsOfAnalyses,
  lockReviewRequest,
  setReviewRequestStatus,
  type ReviewableVersion,
  type ReviewRequestRecord,
  type SignOffRecord,
} from '../repositories/reviews.repo'
import { findActiveUserById } from '../repositories/users.repo'
import { recordAudit } from './audit.service'
import {
  canComment,
  canRequestReview,
  canSignOff,
  canWithdrawReview,
  membershipIn,
  readableLabIds,
  REVIEWER_ROLE,
} from '../../shared/access'
import { allowOnly, assertWriter, readable } from '../access/records'
import { enqueueMail } from './mail-outbox.service'
import { signOffHash } from './sign-off-hash'

/**
 * Review and sign-off of analysis versions. Members of the lab read the thread and the sign-off
 * state; scientists and PIs ask a biostatistician of the lab for a review; every member comments;
 * only the addressed biostatistician decides, and never on an analysis they wrote. A sign-off holds
 * for its version alone. Outside the caller's labs everything answers 404.
 */

/** Where the result page of a version lives in the app (used in e-mails). */
export function analysisLink(analysisId: number, versionNo: number): string {
  return `${publicUrl.replace(/\/+$/, '')}/analyses/${analysisId}?version=${versionNo}`
}

function isAuthor(userId: number, version: ReviewableVersion): boolean {
  return version.analysisCreatedBy === userId || version.versionCreatedBy === userId
}

const authorsOf = (version: ReviewableVersion) => [version.analysisCreatedBy, version.versionCreatedBy]

function toRequest(record: ReviewRequestRecord): ReviewRequest {
  return {
    id: record.id,
    analysisId: record.analysisId,
    analysisName: record.analysisName,
    labId: record.labId,
    versionNo: record.versionNo,
    requestedBy: record.requestedBy,
    reviewer: { id: record.reviewer.id, name: record.reviewer.name },
    message: record.message,
    status: record.status,
    createdAt: record.createdAt,
    decidedAt: record.decidedAt,
  }
}

// ---------------------------------------------------------------- sign-off state

async function verifiedSignOffs(records: SignOffRecord[], conn: Conn): Promise<SignOff[]> {
  const hashes = new Map<number, string>()
  const out: SignOff[] = []
  for (const record of records) {
    let current = hashes.get(record.analysisVersionId)
    if (current === undefined) {
      current = signOffHash(await findSignableContent(record.analysisVersionId, conn))
      hashes.set(record.analysisVersionId, current)
    }
    out.push({
      id: record.id,
      versionNo: record.versionNo,
      signedBy: record.signedBy,
      signedAt: record.signedAt,
      hash: record.hash,
      hashValid: record.hash === current,
    })
  }
  return out
}

/**
 * The sign-off state of one version: covered only by a sign-off of this very version whose hash
 * still matches what is stored. Sign-offs of other versions are listed as earlier (not covering).
 */
export async function signOffStateOf(
  analysisId: number,
  versionNo: number,
  conn: Conn = db,
): Promise<SignOffState> {
  const all = await verifiedSignOffs(await listSignOffsOfAnalyses([analysisId], conn), conn)
  const own = all.filter((s) => s.versionNo === versionNo)
  const valid = own.filter((s) => s.hashValid)
  return {
    signedOff: valid.length > 0,
    coveringSignOff: valid[0] ?? null,
    earlierSignOffs: all.filter((s) => s.versionNo < versionNo),
    tampered: own.filter((s) => !s.hashValid),
  }
}

// ---------------------------------------------------------------- reading

async function reviewersOf(version: ReviewableVersion): Promise<{ id: number; name: string }[]> {
  const members = await listMembersOfLab(version.labId)
  return members
    .filter((m) => m.role === REVIEWER_ROLE && !isAuthor(m.userId, version))
    .map((m) => ({ id: m.userId, name: m.name }))
}

export async function getReviewState(
  user: CurrentUser,
  analysisId: number,
  versionNo: number,
): Promise<ReviewState> {
  const version = await readable(user, 'analysisVersion', { analysisId, versionNo })
  const [signOff, requests, comments, reviewers, content] = await Promise.all([
    signOffStateOf(analysisId, versionNo),
    listRequestsOfVersion(version.id),
    listCommentsOfVersion(version.id),
    reviewersOf(version),
    findSignableContent(version.id),
  ])
  return {
    signOff,
    fingerprint: signOffHash(content),
    requests: requests.map(toRequest),
    comments: comments.map((c): ReviewComment => ({
      id: c.id,
      parentId: c.parentId,
      author: c.author,
      body: c.body,
      createdAt: c.createdAt,
    })),
    reviewers,
    permissions: {
      requestReview: canRequestReview(user, version.labId) && version.status === 'done',
      comment: canComment(user, version.labId),
    },
  }
}

export async function getSignOffState(
  user: CurrentUser,
  analysisId: number,
  versionNo: number,
): Promise<SignOffState> {
  await readable(user, 'analysisVersion', { analysisId, versionNo })
  return signOffStateOf(analysisId, versionNo)
}

/** Requests addressed to the caller in their labs, open ones first. */
export async function listMyReviews(user: CurrentUser, onlyOpen: boolean): Promise<ReviewRequest[]> {
  return (await listRequestsForReviewer(user.id, readableLabIds(user), onlyOpen)).map(toRequest)
}

// ---------------------------------------------------------------- writing

export async function requestReview(
  user: CurrentUser,
  analysisId: number,
  versionNo: number,
  input: ReviewRequestCreate,
): Promise<ReviewRequest> {
  return db.transaction(async (trx) => {
    const version = await readable(user, 'analysisVersion', { analysisId, versionNo }, trx)
    assertWriter(user, version.labId, 'review')
    if (version.status !== 'done') {
      throw new ConflictError('Only a finished version can be reviewed.', { status: version.status })
    }
    const reviewer = (await listMembersOfLab(version.labId, trx)).find((m) => m.userId === input.reviewerId)
    if (!reviewer || reviewer.role !== REVIEWER_ROLE) {
      throw new InvalidPayloadError('Choose a biostatistician of this lab as reviewer.', {
        field: 'reviewerId',
      })
    }
    if (isAuthor(reviewer.userId, version)) {
      throw new InvalidPayloadError('Nobody reviews their own analysis: choose another biostatistician.', {
        field: 'reviewerId',
      })
    }
    const open = (await listRequestsOfVersion(version.id, trx)).find(
      (r) => r.status === 'open' && r.reviewer.id === reviewer.userId,
    )
    if (open) throw new ConflictError(`${reviewer.name} already has an open request for this version.`)
    const id = await insertReviewRequest(
      {
        analysisVersionId: version.id,
        requestedBy: user.id,
        reviewerId: reviewer.userId,
        message: input.message,
      },
      trx,
    )
    await enqueueMail(
      trx,
      reviewRequestMail({
        to: reviewer.email,
        reviewerName: reviewer.name,
        requesterName: user.name,
        analysisName: version.analysisName,
        versionNo,
        labName: version.labName,
        message: input.message,
        link: analysisLink(analysisId, versionNo),
      }),
    )
    await recordAudit(trx, {
      action: 'review.requested',
      actorUserId: user.id,
      labId: version.labId,
      subjectType: 'review_request',
      subjectId: id,
      details: { analysisId, versionNo, reviewerId: reviewer.userId },
    })
    return toRequest((await findReviewRequest(id, trx))!)
  })
}

async function insertComment(
  trx: Conn,
  user: CurrentUser,
  version: ReviewableVersion,
  body: string,
  parentId: number | null,
): Promise<number> {
  const id = await insertReviewComment(
    { analysisVersionId: version.id, parentId, authorId: user.id, body },
    trx,
  )
  await recordAudit(trx, {
    action: 'review.commented',
    actorUserId: user.id,
    labId: version.labId,
    subjectType: 'review_comment',
    subjectId: id,
    details: {
      analysisId: version.analysisId,
      versionNo: version.versionNo,
      ...(parentId ? { parentId } : {}),
    },
  })
  return id
}

export async function addComment(
  user: CurrentUser,
  analysisId: number,
  versionNo: number,
  input: ReviewCommentCreate,
): Promise<ReviewComment> {
  return db.transaction(async (trx) => {
    const version = await readable(user, 'analysisVersion', { analysisId, versionNo }, trx)
    const parentId = input.parentId ?? null
    if (parentId !== null && (await findCommentVersionId(parentId, trx)) !== version.id) {
      throw new InvalidPayloadError('A reply must answer a comment on the same version.', {
        field: 'parentId',
      })
    }
    const id = await insertComment(trx, user, version, input.body, parentId)
    const created = (await listCommentsOfVersion(version.id, trx)).find((c) => c.id === id)!
    return { id, parentId, author: created.author, body: created.body, createdAt: created.createdAt }
  })
}

/** The addressed biostatistician signs the version off or asks for changes. */
export async function decideReview(
  user: CurrentUser,
  requestId: number,
  input: ReviewDecision,
): Promise<{ request: ReviewRequest; signOff: SignOffState }> {
  return db.transaction(async (trx) => {
    const request = await readable(user, 'reviewRequest', requestId, trx)
    await lockReviewRequest(request.id, trx)
    const version = (await findReviewableVersion(request.analysisId, request.versionNo, trx))!
    const role = membershipIn(user, request.labId)!.role
    allowOnly(
      role === REVIEWER_ROLE,
      `Only a biostatistician of ${version.labName} can sign off or ask for changes.`,
      { requiredRoles: [REVIEWER_ROLE], yourRole: role },
    )
    allowOnly(request.reviewer.id === user.id, `This request is addressed to ${request.reviewer.name}.`)
    allowOnly(
      canSignOff(user, { labId: version.labId, authorIds: authorsOf(version) }),
      'Nobody signs off their own analysis.',
    )
    const current = (await findReviewRequest(requestId, trx))!
    if (current.status !== 'open') {
      throw new ConflictError('This request is already closed.', { status: current.status })
    }
    if (input.comment) await insertComment(trx, user, version, input.comment, null)
    await setReviewRequestStatus(request.id, input.decision, trx)
    if (input.decision === 'signed_off') {
      const hash = signOffHash(await findSignableContent(version.id, trx))
      const already = (await listSignOffsOfAnalyses([version.analysisId], trx)).some(
        (s) => s.analysisVersionId === version.id && s.signedBy.id === user.id,
      )
      if (already) throw new ConflictError('You have already signed off this version.')
      const signOffId = await insertSignOff(
        { analysisVersionId: version.id, reviewRequestId: request.id, signedBy: user.id, hash },
        trx,
      )
      await recordAudit(trx, {
        action: 'review.signed_off',
        actorUserId: user.id,
        labId: version.labId,
        subjectType: 'sign_off',
        subjectId: signOffId,
        details: {
          analysisId: version.analysisId,
          versionNo: version.versionNo,
          requestId: request.id,
          hash,
        },
      })
    } else {
      await recordAudit(trx, {
        action: 'review.changes_requested',
        actorUserId: user.id,
        labId: version.labId,
        subjectType: 'review_request',
        subjectId: request.id,
        details: { analysisId: version.analysisId, versionNo: version.versionNo },
      })
    }
    const requester = await findActiveUserById(request.requestedBy.id, trx)
    if (requester) {
      await enqueueMail(
        trx,
        reviewDecisionMail({
          to: request.requesterEmail,
          reviewerName: user.name,
          analysisName: version.analysisName,
          versionNo: version.versionNo,
          decision: input.decision,
          comment: input.comment,
          link: analysisLink(version.analysisId, version.versionNo),
        }),
      )
    }
    return {
      request: toRequest((await findReviewRequest(request.id, trx))!),
      signOff: await signOffStateOf(version.analysisId, version.versionNo, trx),
    }
  })
}

/** The requester (or a PI of the lab) takes back an open request. */
export async function withdrawReview(user: CurrentUser, requestId: number): Promise<ReviewRequest> {
  return db.transaction(async (trx) => {
    const request = await readable(user, 'reviewRequest', requestId, trx)
    await lockReviewRequest(request.id, trx)
    allowOnly(
      canWithdrawReview(user, { labId: request.labId, requestedById: request.requestedBy.id }),
      'Only the person who asked, or a PI of the lab, can withdraw a request.',
    )
    const current = (await findReviewRequest(requestId, trx))!
    if (current.status !== 'open')
      throw new ConflictError('This request is already closed.', { status: current.status })
    await setReviewRequestStatus(request.id, 'withdrawn', trx)
    await recordAudit(trx, {
      action: 'review.withdrawn',
      actorUserId: user.id,
      labId: request.labId,
      subjectType: 'review_request',
      subjectId: request.id,
      details: { analysisId: request.analysisId, versionNo: request.versionNo },
    })
    return toRequest((await findReviewRequest(request.id, trx))!)
  })
}
