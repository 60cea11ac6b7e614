import type { Board, BoardReviewStatus } from '../../shared/schemas/board'
import { request } from './http'

export interface BoardFilter {
  projectId?: number
  reviewStatus?: BoardReviewStatus
  authorId?: number
  from?: string
  to?: string
}

export function getBoard(labId: number, filter: BoardFilter = {}): Promise<Board> {
  const search = new URLSearchParams()
  for (const [key, value] of Object.entries(filter))
    if (value !== undefined && value !== '') search.set(key, String(value))
  const text = search.toString()
  return request<Board>(`/api/v1/labs/${labId}/board${text ? `?${text}` : ''}`)
}
