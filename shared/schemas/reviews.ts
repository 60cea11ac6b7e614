import { z } from 'zod'

const Id = z.coerce.number().int().positive()
const Person = z.object({ id: z.number().int(), name: z.string() })

export const ReviewStatus = z.enum(['open', 'changes_requested', 'signed_off', 'withdrawn'])
export type ReviewStatus = z.infer<typeof ReviewStatus>

export const ReviewRequest = z.object({
  id: z.number().int().positive(),
  analysisId: z.number().int().positive(),
  analysisName: z.string(),
  labId: z.number().int().positive(),
  versionNo: z.number().int().positive(),
  requestedBy: Person,
  reviewer: Person,
  message: z.string(),
  status: ReviewStatus,
  createdAt: z.string(),
  decidedAt: z.string().nullable(),
})
export type ReviewRequest = z.infer<typeof ReviewRequest>

export const ReviewComment = z.object({
  id: z.number().int().positive(),
  parentId: z.number().int().positive().nullable(),
  author: Person,
  body: z.string(),
  createdAt: z.string(),
})
export type ReviewComment = z.infer<typeof ReviewComment>

export const SignOff = z.object({
  id: z.number().int().positive(),
  versionNo: z.number().int().positive(),
  signedBy: Person,
  signedAt: z.string(),
  hash: z.string(),
  /** False when what is stored now no longer hashes to what was signed (the record was altered). */
  hashValid: z.boolean(),
})
export type SignOff = z.infer<typeof SignOff>

/** Whether a version carries a sign-off; sign-offs of earlier versions never cover a later one. */
export const SignOffState = z.object({
  signedOff: z.boolean(),
  coveringSignOff: SignOff.nullable(),
  earlierSignOffs: z.array(SignOff),
  /** Sign-offs of this version whose hash no longer matches. */
  tampered: z.array(SignOff),
})
export type SignOffState = z.infer<typeof SignOffState>

export const ReviewState = z.object({
  signOff: SignOffState,
  /**
   * The version's fingerprint as stored now: the SHA-256 a sign-off would vouch for (data
   * checksum, settings, engine version, result). The sign-off confirmation names it.
   */
  fingerprint: z.string(),
  requests: z.array(ReviewRequest),
  /** Oldest first; replies carry parentId. */
  comments: z.array(ReviewComment),
  /** Biostatisticians of the lab who may review this version (never its author). */
  reviewers: z.array(Person),
  permissions: z.object({ requestReview: z.boolean(), comment: z.boolean() }),
})
export type ReviewState = z.infer<typeof ReviewState>

export const ReviewRequestCreate = z.object({
  reviewerId: z.number().int().positive(),
  message: z.string().trim().max(4000).default(''),
})
export type ReviewRequestCreate = z.infer<typeof ReviewRequestCreate>

export const ReviewCommentCreate = z.object({
  body: z.string().trim().min(1, 'Write something first').max(10_000),
  parentId: z.number().int().positive().optional(),
})
export type ReviewCommentCreate = z.infer<typeof ReviewCommentCreate>

export const ReviewDecision = z.object({
  decision: z.enum(['signed_off', 'changes_requested']),
  /** Posted as a comment on the version with the decision. */
  comment: z.string().trim().max(10_000).optional(),
})
export type ReviewDecision = z.infer<typeof ReviewDecision>

export const ReviewRequestParams = z.object({ requestId: Id })
export type ReviewRequestParams = z.infer<typeof ReviewRequestParams>

export const ReviewListQuery = z.object({
  /** 'all' includes closed requests; open ones come first either way. */
  scope: z.enum(['open', 'all']).default('all'),
})
export type ReviewListQuery = z.infer<typeof ReviewListQuery>
