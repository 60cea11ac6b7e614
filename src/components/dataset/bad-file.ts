import type { ApiError } from '@/api/http'

interface BadFilePlace {
  row?: unknown
  column?: unknown
  columnNumber?: unknown
}

/**
 * Short labels for where the server found a problem in a file ("Row 14", "Column 3 “length”"),
 * read from the error details the ingest attaches; empty when the error names no place.
 */
export function badFileWhere(error: ApiError): string[] {
  const details = error.details as BadFilePlace | undefined
  if (!details || typeof details !== 'object') return []
  const places: string[] = []
  if (typeof details.row === 'number') places.push(`Row ${details.row}`)
  const name = typeof details.column === 'string' ? `“${details.column}”` : null
  const number = typeof details.columnNumber === 'number' ? `Column ${details.columnNumber}` : null
  if (number && name) places.push(`${number} ${name}`)
  else if (number) places.push(number)
  else if (name) places.push(`Column ${name}`)
  return places
}
