import { areYesNoLabels, defaultPositiveLabel } from '../../../shared/analysis/binary-response'
import type { ColumnProfile } from '../../../shared/schemas/datasets'

/**
 * A text column the profile shows with exactly two values can be a response only as yes/no: the
 * two values and the one counted as yes unless a person chooses the other (defaultPositiveLabel,
 * as the analysis settings decide it). Null for numbers, or text whose values are not two known
 * labels (areYesNoLabels).
 */
export function yesNoReading(column: ColumnProfile): { values: string[]; positive: string } | null {
  if (column.type !== 'text' || column.distinctCapped || column.distinctCount !== 2) return null
  const values = (column.topValues ?? []).map((t) => t.value)
  if (!areYesNoLabels(values)) return null
  return { values, positive: defaultPositiveLabel(values) }
}

/** The words shown with such a column where a response is chosen. */
export function yesNoHint(column: ColumnProfile): string | null {
  const reading = yesNoReading(column)
  return reading ? `two values: analysed as yes/no (counted as yes: ${reading.positive})` : null
}
