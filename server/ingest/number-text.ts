/**
 * How stored text is read as a number. Cells stay stored exactly as uploaded; these rules decide
 * which of them count as numbers, for profiling, sorting, exclusion rules and engine read-back alike.
 */

export type DecimalMark = '.' | ','

const INTEGER = /^[+-]?\d+$/
const DECIMAL_POINT = /^[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?$/
const DECIMAL_COMMA = /^[+-]?(?:\d+,?\d*|,\d+)(?:[eE][+-]?\d+)?$/

export const isIntegerText = (text: string): boolean => INTEGER.test(text)

export function isNumberText(text: string, decimalMark: DecimalMark): boolean {
  return (decimalMark === ',' ? DECIMAL_COMMA : DECIMAL_POINT).test(text)
}

/** The number in already-trimmed `text`, or NaN when it is not written as a number. ±Infinity means overflow. */
export function parseNumberText(text: string, decimalMark: DecimalMark): number {
  if (!isNumberText(text, decimalMark)) return NaN
  return Number(decimalMark === ',' ? text.replace(',', '.') : text)
}

/** The same shape test as a PostgreSQL regular expression, for SQL that must agree with the code above. */
export function numberPatternSql(decimalMark: DecimalMark): string {
  return decimalMark === ','
    ? '^[+-]?([0-9]+,?[0-9]*|,[0-9]+)([eE][+-]?[0-9]+)?$'
    : '^[+-]?([0-9]+\\.?[0-9]*|\\.[0-9]+)([eE][+-]?[0-9]+)?$'
}

const isSpaceCode = (c: number) => c === 32 || c === 9 || c === 10 || c === 13 || c === 160

/** The characters trimCell removes, as a PostgreSQL escape-string literal for btrim(). */
export const TRIM_CHARS_SQL = "E' \\t\\n\\r\\u00a0'"

/** Removes spaces, tabs, line breaks and no-break spaces at both ends (the same set as TRIM_CHARS_SQL). */
export function trimCell(text: string): string {
  let start = 0
  let end = text.length
  while (start < end && isSpaceCode(text.charCodeAt(start))) start++
  while (end > start && isSpaceCode(text.charCodeAt(end - 1))) end--
  return start === 0 && end === text.length ? text : text.slice(start, end)
}
