import type { ReviewComment } from '../../../shared/schemas/reviews'

export interface ThreadNode {
  comment: ReviewComment
  /** 0 for a top-level comment; replies deeper than a few levels are shown at the last indent. */
  depth: number
}

/**
 * Comments in reading order: each top-level comment (oldest first) followed by its replies, depth
 * first, oldest first. A reply whose parent is missing is shown at the top level rather than lost.
 */
export function threadOrder(comments: ReviewComment[], maxDepth = 4): ThreadNode[] {
  const ids = new Set(comments.map((c) => c.id))
  const children = new Map<number | null, ReviewComment[]>()
  for (const c of comments) {
    const parent = c.parentId !== null && ids.has(c.parentId) ? c.parentId : null
    children.set(parent, [...(children.get(parent) ?? []), c])
  }
  const out: ThreadNode[] = []
  const walk = (parent: number | null, depth: number) => {
    for (const c of children.get(parent) ?? []) {
      out.push({ comment: c, depth: Math.min(depth, maxDepth) })
      walk(c.id, depth + 1)
    }
  }
  walk(null, 0)
  return out
}
