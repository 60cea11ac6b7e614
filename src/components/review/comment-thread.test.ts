import { describe, expect, it } from 'vitest'
import type { ReviewComment } from '../../../shared/schemas/reviews'
import { threadOrder } from './comment-thread'

const c = (id: number, parentId: number | null): ReviewComment => ({
  id,
  parentId,
  author: { id: 1, name: 'Bea Stone' },
  body: `comment ${id}`,
  createdAt: new Date(2026, 0, 1, 0, id).toISOString(),
})

// Ordering rule of our own (common practice for threaded comments, no source).
describe('threadOrder', () => {
  it('puts replies right under their parent, depth first, oldest first', () => {
    const order = threadOrder([c(1, null), c(2, null), c(3, 1), c(4, 3), c(5, 1)])
    expect(order.map((n) => [n.comment.id, n.depth])).toEqual([
      [1, 0],
      [3, 1],
      [4, 2],
      [5, 1],
      [2, 0],
    ])
  })

  it('keeps a reply whose parent is missing, at the top level', () => {
    expect(threadOrder([c(7, 99)]).map((n) => n.depth)).toEqual([0])
  })

  it('caps the indent', () => {
    const deep = [c(1, null), c(2, 1), c(3, 2), c(4, 3)]
    expect(threadOrder(deep, 2).map((n) => n.depth)).toEqual([0, 1, 2, 2])
  })
})
