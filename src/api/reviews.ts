import type {
  ReviewComment,
  ReviewCommentCreate,
  ReviewDecision,
  ReviewRequest,
  ReviewState,
  SignOffState,
} from '../../shared/schemas/reviews'
import { request } from './http'

const versionPath = (analysisId: number, versionNo: number) =>
  `/api/v1/analyses/${analysisId}/versions/${versionNo}`

export function getReviewState(analysisId: number, versionNo: number): Promise<ReviewState> {
  return request<ReviewState>(`${versionPath(analysisId, versionNo)}/review`)
}

export function requestReview(
  analysisId: number,
  versionNo: number,
  input: { reviewerId: number; message?: string },
): Promise<ReviewRequest> {
  return request<ReviewRequest>(`${versionPath(analysisId, versionNo)}/review-requests`, {
    method: 'POST',
    body: input,
  })
}

export function addComment(
  analysisId: number,
  versionNo: number,
  input: ReviewCommentCreate,
): Promise<ReviewComment> {
  return request<ReviewComment>(`${versionPath(analysisId, versionNo)}/comments`, {
    method: 'POST',
    body: input,
  })
}

export function decide(
  requestId: number,
  input: ReviewDecision,
): Promise<{ request: ReviewRequest; signOff: SignOffState }> {
  return request(`/api/v1/review-requests/${requestId}/decision`, { method: 'POST', body: input })
}

export function withdraw(requestId: number): Promise<ReviewRequest> {
  return request<ReviewRequest>(`/api/v1/review-requests/${requestId}/withdraw`, { method: 'POST' })
}

export function listMyReviews(scope: 'open' | 'all' = 'all'): Promise<ReviewRequest[]> {
  return request<ReviewRequest[]>(`/api/v1/review-requests?scope=${scope}`)
}
