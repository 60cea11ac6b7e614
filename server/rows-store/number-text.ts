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

/** How a cell's bytes read as a number: not at all, as an integer, or as a decimal. */
export const NumberShape = { None: 0, Integer: 1, Decimal: 2 } as const
export type NumberShape = (typeof NumberShape)[keyof typeof NumberShape]

const isDigit = (b: number) => b >= 48 && b <= 57

/**
 * The shape test of isIntegerText and isNumberText on UTF-8 bytes (already trimmed), so the
 * profiler can classify a cell without making a string of it. The test beside this file checks it
 * against the regular expressions above.
 */
export function numberShapeOfBytes(
  bytes: Uint8Array,
  start: number,
  end: number,
  decimalMark: DecimalMark,
): NumberShape {
  const mark = decimalMark === ',' ? 44 : 46
  let i = start
  if (i < end && (bytes[i] === 43 || bytes[i] === 45)) i++
  const digitsFrom = i
  while (i < end && isDigit(bytes[i])) i++
  const intDigits = i - digitsFrom
  if (i === end) return intDigits > 0 ? NumberShape.Integer : NumberShape.None
  let fractionDigits = 0
  if (bytes[i] === mark) {
    i++
    const fractionFrom = i
    while (i < end && isDigit(bytes[i])) i++
    fractionDigits = i - fractionFrom
  }
  if (intDigits === 0 && fractionDigits === 0) return NumberShape.None
  if (i < end && (bytes[i] === 101 || bytes[i] === 69)) {
    i++
    if (i < end && (bytes[i] === 43 || bytes[i] === 45)) i++
    const exponentFrom = i
    while (i < end && isDigit(bytes[i])) i++
    if (i === exponentFrom) return NumberShape.None
  }
  return i === end ? NumberShape.Decimal : NumberShape.None
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
