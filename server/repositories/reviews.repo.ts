import type { ReviewStatus } from '../../shared/schemas/reviews'
import { defaultConn, type Conn } from './connection'

const iso = (d: Date) => d.toISOString()

// ---------------------------------------------------------------- versions as reviews see them

/** An analysis version with what review needs to know about it. */
export interface ReviewableVersion {
  id: number
  analysisId: number
  analysisName: string
  labId: number
  labName: string
  versionNo: number
  status: string
  analysisCreatedBy: number
  versionCreatedBy: number
}

const reviewableColumns = [
  'v.id',
  'v.analysis_id',
  'a.name as analysis_name',
  'a.lab_id',
  'l.name as lab_name',
  'v.version_no',
  'v.status',
  'a.created_by as analysis_created_by',
  'v.created_by as version_created_by',
]

interface ReviewableRow {
  id: number
  analysis_id: number
  analysis_name: string
  lab_id: number
  lab_name: string
  version_no: number
  status: string
  analysis_created_by: number
  version_created_by: number
}

function toReviewable(row: ReviewableRow): ReviewableVersion {
  return {
    id: row.id,
    analysisId: row.analysis_id,
    analysisName: row.analysis_name,
    labId: row.lab_id,
    labName: row.lab_name,
    versionNo: row.version_no,
    status: row.status,
    analysisCreatedBy: row.analysis_created_by,
    versionCreatedBy: row.version_created_by,
  }
}

const reviewableQuery = (conn: Conn) =>
  conn('analysis_versions as v')
    .join('analyses as a', 'a.id', 'v.analysis_id')
    .join('datasets as d', 'd.id', 'a.dataset_id')
    .join('labs as l', 'l.id', 'a.lab_id')
    .whereNull('d.deleted_at')

export async function findReviewableVersion(
  analysisId: number,
  versionNo: number,
  conn: Conn = defaultConn,
): Promise<ReviewableVersion | undefined> {
  const row: ReviewableRow | undefined = await reviewableQuery(conn)
    .where({ 'v.analysis_id': analysisId, 'v.version_no': versionNo })
    .first(reviewableColumns)
  return row ? toReviewable(row) : undefined
}

export async function findReviewableVersionById(
  versionId: number,
  conn: Conn = defaultConn,
): Promise<ReviewableVersion | undefined> {
  const row: ReviewableRow | undefined = await reviewableQuery(conn)
    .where('v.id', versionId)
    .first(reviewableColumns)
  return row ? toReviewable(row) : undefined
}

/** Exactly what a sign-off covers, read back from the stored version. */
export interface SignableContent {
  datasetSha256: string
  settings: unknown
  engineVersion: string
  /** The stored result as read back (compared as canonical JSON, so its exact type does not matter). */
  result: unknown
}

export async function findSignableContent(
  versionId: number,
  conn: Conn = defaultConn,
): Promise<SignableContent> {
  const row = await conn('analysis_versions')
    .where({ id: versionId })
    .first('dataset_sha256', 'settings', 'engine_version', 'result')
  return {
    datasetSha256: row.dataset_sha256,
    settings: row.settings,
    engineVersion: row.engine_version,
    result: row.result,
  }
}

// ---------------------------------------------------------------- review requests

export interface ReviewRequestRecord {
  id: number
  analysisVersionId: number
  analysisId: number
  analysisName: string
  labId: number
  versionNo: number
  requestedBy: { id: number; name: string }
  reviewer: { id: number; name: string; email: string }
  requesterEmail: string
  message: string
  status: ReviewStatus
  createdAt: string
  decidedAt: string | null
}

interface RequestRow {
  id: number
  analysis_version_id: number
  analysis_id: number
  analysis_name: string
  lab_id: number
  version_no: number
  requested_by: number
  requester_name: string
  requester_email: string
  reviewer_id: number
  reviewer_name: string
  reviewer_email: string
  message: string
  status: ReviewStatus
  created_at: Date
  decided_at: Date | null
}

function toRequest(row: RequestRow): ReviewRequestRecord {
  return {
    id: row.id,
    analysisVersionId: row.analysis_version_id,
    analysisId: row.analysis_id,
    analysisName: row.analysis_name,
    labId: row.lab_id,
    versionNo: row.version_no,
    requestedBy: { id: row.requested_by, name: row.requester_name },
    requesterEmail: row.requester_email,
    reviewer: { id: row.reviewer_id, name: row.reviewer_name, email: row.reviewer_email },
    message: row.message,
    status: row.status,
    createdAt: iso(row.created_at),
    decidedAt: row.decided_at ? iso(row.decided_at) : null,
  }
}

const requestQuery = (conn: Conn) =>
  conn('review_requests as r')
    .join('analysis_versions as v', 'v.id', 'r.analysis_version_id')
    .join('analyses as a', 'a.id', 'v.analysis_id')
    .join('datasets as d', 'd.id', 'a.dataset_id')
    .join('users as rq', 'rq.id', 'r.requested_by')
    .join('users as rv', 'rv.id', 'r.reviewer_id')
    .whereNull('d.deleted_at')
    .select(
      'r.id',
      'r.analysis_version_id',
      'v.analysis_id',
      'a.name as analysis_name',
      'a.lab_id',
      'v.version_no',
      'r.requested_by',
      'rq.name as requester_name',
      'rq.email as requester_email',
      'r.reviewer_id',
      'rv.name as reviewer_name',
      'rv.email as reviewer_email',
      'r.message',
      'r.status',
      'r.created_at',
      'r.decided_at',
    )

export async function insertReviewRequest(
  values: { analysisVersionId: number; requestedBy: number; reviewerId: number; message: string },
  conn: Conn = defaultConn,
): Promise<number> {
  const [row] = await conn('review_requests')
    .insert({
      analysis_version_id: values.analysisVersionId,
      requested_by: values.requestedBy,
      reviewer_id: values.reviewerId,
      message: values.message,
    })
    .returning('id')
  return row.id
}

export async function findReviewRequest(
  id: number,
  conn: Conn = defaultConn,
): Promise<ReviewRequestRecord | undefined> {
  const row: RequestRow | undefined = await requestQuery(conn).where('r.id', id).first()
  return row ? toRequest(row) : undefined
}

/** Locks the request row for a decision, so two decisions cannot both land. */
export async function lockReviewRequest(id: number, conn: Conn): Promise<void> {
  await conn('review_requests').where({ id }).forUpdate().first('id')
}

export async function listRequestsOfVersion(
  versionId: number,
  conn: Conn = defaultConn,
): Promise<ReviewRequestRecord[]> {
  const rows: RequestRow[] = await requestQuery(conn)
    .where('r.analysis_version_id', versionId)
    .orderBy([
      { column: 'r.created_at', order: 'desc' },
      { column: 'r.id', order: 'desc' },
    ])
  return rows.map(toRequest)
}

/** Requests addressed to a reviewer in the given labs: open ones first, newest first within. */
export async function listRequestsForReviewer(
  reviewerId: number,
  labIds: number[],
  onlyOpen: boolean,
  conn: Conn = defaultConn,
): Promise<ReviewRequestRecord[]> {
  if (!labIds.length) return []
  const query = requestQuery(conn).where('r.reviewer_id', reviewerId).whereIn('a.lab_id', labIds)
  if (onlyOpen) query.where('r.status', 'open')
  const rows: RequestRow[] = await query.orderByRaw(
    `case when r.status = 'open' then 0 else 1 end, r.created_at desc, r.id desc`,
  )
  return rows.map(toRequest)
}

export async function setReviewRequestStatus(id: number, status: ReviewStatus, conn: Conn): Promise<void> {
  await conn('review_requests')
    .where({ id })
    .update({
      status,
      updated_at: conn.fn.now(),
      decided_at: status === 'open' ? null : conn.fn.now(),
    })
}

/** Newest request state per version of the given analyses, for the board. */
export async function latestRequestStatusOfVersions(
  versionIds: number[],
  conn: Conn = defaultConn,
): Promise<Map<number, ReviewStatus>> {
  if (!versionIds.length) return new Map()
  const rows: { analysis_version_id: number; status: ReviewStatus }[] = await conn('review_requests')
    .distinctOn('analysis_version_id')
    .whereIn('analysis_version_id', versionIds)
    .whereNot('status', 'withdrawn')
    .orderBy([
      { column: 'analysis_version_id' },
      { column: 'created_at', order: 'desc' },
      { column: 'id', order: 'desc' },
    ])
    .select('analysis_version_id', 'status')
  return new Map(rows.map((r) => [Number(r.analysis_version_id), r.status]))
}

// ---------------------------------------------------------------- comments

export interface ReviewCommentRecord {
  id: number
  analysisVersionId: number
  parentId: number | null
  author: { id: number; name: string }
  body: string
  createdAt: string
}

export async function insertReviewComment(
  values: { analysisVersionId: number; parentId: number | null; authorId: number; body: string },
  conn: Conn = defaultConn,
): Promise<number> {
  const [row] = await conn('review_comments')
    .insert({
      analysis_version_id: values.analysisVersionId,
      parent_id: values.parentId,
      author_id: values.authorId,
      body: values.body,
    })
    .returning('id')
  return row.id
}

export async function listCommentsOfVersion(
  versionId: number,
  conn: Conn = defaultConn,
): Promise<ReviewCommentRecord[]> {
  const rows: {
    id: number
    analysis_version_id: number
    parent_id: number | null
    author_id: number
    author_name: string
    body: string
    created_at: Date
  }[] = await conn('review_comments as c')
    .join('users as u', 'u.id', 'c.author_id')
    .where('c.analysis_version_id', versionId)
    .orderBy([{ column: 'c.created_at' }, { column: 'c.id' }])
    .select(
      'c.id',
      'c.analysis_version_id',
      'c.parent_id',
      'c.author_id',
      'u.name as author_name',
      'c.body',
      'c.created_at',
    )
  return rows.map((r) => ({
    id: r.id,
    analysisVersionId: r.analysis_version_id,
    parentId: r.parent_id,
    author: { id: r.author_id, name: r.author_name },
    body: r.body,
    createdAt: iso(r.created_at),
  }))
}

export async function findCommentVersionId(
  commentId: number,
  conn: Conn = defaultConn,
): Promise<number | undefined> {
  const row: { analysis_version_id: number } | undefined = await conn('review_comments')
    .where({ id: commentId })
    .first('analysis_version_id')
  return row?.analysis_version_id
}

// ---------------------------------------------------------------- sign-offs

export interface SignOffRecord {
  id: number
  analysisVersionId: number
  versionNo: number
  signedBy: { id: number; name: string }
  signedAt: string
  hash: string
}

export async function insertSignOff(
  values: { analysisVersionId: number; reviewRequestId: number | null; signedBy: number; hash: string },
  conn: Conn = defaultConn,
): Promise<number> {
  const [row] = await conn('sign_offs')
    .insert({
      analysis_version_id: values.analysisVersionId,
      review_request_id: values.reviewRequestId,
      signed_by: values.signedBy,
      hash: values.hash,
    })
    .returning('id')
  return row.id
}

/** Every sign-off of every version of an analysis, newest version first. */
export async function listSignOffsOfAnalyses(
  analysisIds: number[],
  conn: Conn = defaultConn,
): Promise<(SignOffRecord & { analysisId: number })[]> {
  if (!analysisIds.length) return []
  const rows: {
    id: number
    analysis_version_id: number
    analysis_id: number
    version_no: number
    signed_by: number
    signer_name: string
    signed_at: Date
    hash: string
  }[] = await conn('sign_offs as s')
    .join('analysis_versions as v', 'v.id', 's.analysis_version_id')
    .join('users as u', 'u.id', 's.signed_by')
    .whereIn('v.analysis_id', analysisIds)
    .orderBy([
      { column: 'v.version_no', order: 'desc' },
      { column: 's.signed_at', order: 'desc' },
    ])
    .select(
      's.id',
      's.analysis_version_id',
      'v.analysis_id',
      'v.version_no',
      's.signed_by',
      'u.name as signer_name',
      's.signed_at',
      's.hash',
    )
  return rows.map((r) => ({
    id: r.id,
    analysisVersionId: r.analysis_version_id,
    analysisId: r.analysis_id,
    versionNo: r.version_no,
    signedBy: { id: r.signed_by, name: r.signer_name },
    signedAt: iso(r.signed_at),
    hash: r.hash,
  }))
}
