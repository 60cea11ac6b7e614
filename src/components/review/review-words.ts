import type { BoardReviewStatus } from '../../../shared/schemas/board'
import type { ReviewStatus } from '../../../shared/schemas/reviews'

export const requestStatusLook: Record<ReviewStatus, { text: string; color: string }> = {
  open: { text: 'waiting for review', color: 'info' },
  changes_requested: { text: 'changes asked for', color: 'warning' },
  signed_off: { text: 'signed off', color: 'success' },
  withdrawn: { text: 'withdrawn', color: 'default' },
}

export const boardStatusLook: Record<BoardReviewStatus, { text: string; color: string; explain: string }> = {
  signed_off: {
    text: 'signed off',
    color: 'success',
    explain: 'A biostatistician signed off this exact version.',
  },
  in_review: {
    text: 'in review',
    color: 'info',
    explain: 'A biostatistician has been asked to review this version.',
  },
  changes_requested: {
    text: 'changes asked for',
    color: 'warning',
    explain: 'The reviewer asked for changes; a new version is needed.',
  },
  not_covered: {
    text: 'earlier version signed',
    color: 'warning',
    explain: 'An earlier version was signed off; that sign-off does not cover the newest version.',
  },
  not_requested: {
    text: 'not reviewed',
    color: 'default',
    explain: 'Nobody has been asked to review this yet.',
  },
}

/** Dates have one format, in src/formatting/dates.ts. */
export { formatDate, formatDateTime } from '@/formatting/dates'
