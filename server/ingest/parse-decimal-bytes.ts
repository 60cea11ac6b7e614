const POWERS_OF_TEN = Array.from({ length: 23 }, (_, k) => Number(`1e${k}`))
const MAX_EXACT_DIGITS = 15

/**
 * Reads a plain decimal number (`-12.5`, `3`, `.25`, `1e-3`, with `,` as the decimal mark when asked)
 * straight from UTF-8 bytes, or returns NaN when the text is anything else (spaces, `NA`, hex, too many
 * digits) so the caller falls back to `Number()` on the decoded text.
 *
 * The result is exactly `Number(text)`: with at most 15 significant digits the digits form an exact
 * double, and scaling it by a power of ten up to 1e22 (also exact) takes one correctly rounded
 * multiplication or division (Clinger, "How to read floating point numbers accurately", PLDI 1990,
 * the fast path). The test beside this file compares it with `Number()` on random and awkward input.
 */
export function parseDecimalBytes(
  bytes: Uint8Array,
  start: number,
  end: number,
  decimalComma: boolean,
): number {
  let i = start
  let negative = false
  if (i < end && (bytes[i] === 45 || bytes[i] === 43)) {
    negative = bytes[i] === 45
    i++
  }
  let mantissa = 0
  let digits = 0
  let scale = 0
  let sawDigit = false
  let sawMark = false
  for (; i < end; i++) {
    const c = bytes[i]
    if (c >= 48 && c <= 57) {
      sawDigit = true
      if (sawMark) scale--
      if (mantissa === 0 && c === 48) continue
      if (digits === MAX_EXACT_DIGITS) return NaN
      mantissa = mantissa * 10 + (c - 48)
      digits++
    } else if (!sawMark && (c === 46 || (decimalComma && c === 44))) {
      sawMark = true
    } else break
  }
  if (!sawDigit) return NaN
  if (i < end) {
    if (bytes[i] !== 101 && bytes[i] !== 69) return NaN
    i++
    let exponentNegative = false
    if (i < end && (bytes[i] === 45 || bytes[i] === 43)) {
      exponentNegative = bytes[i] === 45
      i++
    }
    if (i === end) return NaN
    let exponent = 0
    for (; i < end; i++) {
      const c = bytes[i]
      if (c < 48 || c > 57) return NaN
      if (exponent < 1000) exponent = exponent * 10 + (c - 48)
    }
    scale += exponentNegative ? -exponent : exponent
  }
  if (mantissa === 0) return negative ? -0 : 0
  let value: number
  if (scale === 0) value = mantissa
  else if (scale > 0 && scale < POWERS_OF_TEN.length) value = mantissa * POWERS_OF_TEN[scale]
  else if (scale < 0 && -scale < POWERS_OF_TEN.length) value = mantissa / POWERS_OF_TEN[-scale]
  else return NaN
  return negative ? -value : value
}
