import { InvalidPayloadError, UnprocessableError } from '../errors/app-error'

/** Why a file was refused; stable codes the client may switch on (the message is for people). */
export type BadFileReason =
  | 'UNSUPPORTED_FILE_TYPE'
  | 'EMPTY_FILE'
  | 'HEADER_ONLY'
  | 'ONE_ROW'
  | 'BINARY_FILE'
  | 'WORKBOOK_AS_TEXT'
  | 'OLD_EXCEL_FORMAT'
  | 'BROKEN_WORKBOOK'
  | 'ENCRYPTED_WORKBOOK'
  | 'WORKBOOK_LIMIT'
  | 'SHEET_NOT_FOUND'
  | 'RAGGED_ROW'
  | 'BLANK_ROW'
  | 'BLANK_HEADER'
  | 'DUPLICATE_HEADER'
  | 'NAME_TOO_LONG'
  | 'TOO_MANY_COLUMNS'
  | 'FIELD_TOO_LONG'
  | 'UNTERMINATED_QUOTE'
  | 'TEXT_AFTER_QUOTE'
  | 'NUMBER_OVERFLOW'
  | 'UNREADABLE_TEXT'

export interface BadFileDetails {
  reason: BadFileReason
  /** Row as a spreadsheet numbers it: the header is row 1. */
  row?: number
  /** Column name from the header, when known. */
  column?: string
  /** 1-based column position. */
  columnNumber?: number
  /** Which workbook limit was hit (see ingestConfig.workbook): partBytes, totalBytes, statedSize, … */
  limit?: string
}

/** A file that cannot be stored as a table: 400 with the row and column in the message and details. */
export function badFile(
  reason: BadFileReason,
  message: string,
  where: Omit<BadFileDetails, 'reason'> = {},
): InvalidPayloadError {
  return new InvalidPayloadError(message, { reason, ...where })
}

/** A well-formed table too thin to analyse (one data row): 422. */
export function thinFile(reason: BadFileReason, message: string): UnprocessableError {
  return new UnprocessableError(message, { reason })
}

/** "column 3 ("soma area")" — names are quoted because they may hold spaces or punctuation. */
export function describeColumn(index: number, name: string | undefined): string {
  return name ? `column ${index + 1} ("${name}")` : `column ${index + 1}`
}
