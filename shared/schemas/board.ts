import { z } from 'zod'
import { AnalysisStatus } from './analyses'

/** Review state of an analysis' newest version, as the board shows it. */
export const BoardReviewStatus = z.enum([
  'signed_off',
  'in_review',
  'changes_requested',
  /** An earlier version was signed off, the newest is not covered. */
  'not_covered',
  'not_requested',
])
export type BoardReviewStatus = z.infer<typeof BoardReviewStatus>

export const BoardQuery = z.object({
  projectId: z.coerce.number().int().positive().optional(),
  reviewStatus: BoardReviewStatus.optional(),
  authorId: z.coerce.number().int().positive().optional(),
  from: z.coerce.date().optional(),
  to: z.coerce.date().optional(),
})
export type BoardQuery = z.infer<typeof BoardQuery>

export const BoardRow = z.object({
  analysisId: z.number().int().positive(),
  name: z.string(),
  project: z.object({ id: z.number().int().positive(), name: z.string() }),
  dataset: z.object({ id: z.number().int().positive(), name: z.string() }),
  author: z.object({ id: z.number().int(), name: z.string() }),
  versionNo: z.number().int().positive(),
  runStatus: AnalysisStatus,
  /** The newest version's date (finished, else created). */
  date: z.string(),
  effectiveN: z.number().nullable(),
  designEffect: z.number().nullable(),
  /** Independent units per condition at the condition level; empty until done. */
  unitsPerCondition: z.array(z.object({ condition: z.string(), nUnits: z.number().int().nullable() })),
  minUnitsPerCondition: z.number().int().nullable(),
  warningCount: z.number().int().nonnegative(),
  reviewStatus: BoardReviewStatus,
})
export type BoardRow = z.infer<typeof BoardRow>

export const Board = z.object({
  rows: z.array(BoardRow),
  /** Filter choices: every project and author on the lab's board. */
  projects: z.array(z.object({ id: z.number().int().positive(), name: z.string() })),
  authors: z.array(z.object({ id: z.number().int(), name: z.string() })),
})
export type Board = z.infer<typeof Board>
