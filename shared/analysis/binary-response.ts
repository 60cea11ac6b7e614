/**
 * A yes/no response read from the values of one column (two labels, or 0 and 1): which value
 * counts as yes, and the 0/1 column the engine fits. Shared by the app's run (server read-back),
 * the settings form (its suggestion) and the command line, so all three decide alike.
 */

/** Values read as "yes" when exactly one of a column's two values is one of them (common practice, no source). */
const YES_WORDS = new Set(['yes', 'y', 'true', 'positive', 'pos', 'present', 'responder', '+'])

/** Two values that are the same number ("1" and "1.0") are one value. */
function keyOf(value: string, toNumber: (text: string) => number): string {
  const number = toNumber(value)
  return value.trim() !== '' && Number.isFinite(number) ? `#${number}` : `"${value}`
}

/**
 * The value counted as yes when nobody said: 1 of a 0/1 column; else the one value that reads as
 * yes ("yes", "true", "positive", "present", "+" …); else the second of the two in sorted order
 * (numbers by size, text alphabetically: "negative" < "positive", "no" < "yes"). A person can
 * always choose the other one; the choice is stored with the settings and shown with the result.
 *
 * @example
 * defaultPositiveLabel(['negative', 'positive']) // → 'positive'
 * defaultPositiveLabel(['1', '0']) // → '1'
 * defaultPositiveLabel(['absent', 'present']) // → 'present'
 */
export function defaultPositiveLabel(
  values: readonly string[],
  toNumber: (text: string) => number = Number,
): string {
  if (values.length === 0) throw new Error('defaultPositiveLabel needs at least one value')
  const one = values.find((v) => v.trim() !== '' && toNumber(v) === 1)
  const zeroOrOne = values.every((v) => v.trim() !== '' && (toNumber(v) === 0 || toNumber(v) === 1))
  if (zeroOrOne && one !== undefined) return one
  const yes = values.filter((v) => YES_WORDS.has(v.trim().toLowerCase()))
  if (yes.length === 1) return yes[0]
  const sorted = [...values].sort(new Intl.Collator('en', { numeric: true, sensitivity: 'base' }).compare)
  return sorted[Math.min(1, sorted.length - 1)]
}

/**
 * Whether a text column's values can be the two answers of a yes/no response: exactly two, neither
 * reading as a number in either decimal style. "5" and "n.d." are a measurement with a note, not
 * yes/no (common practice, no source).
 *
 * @example
 * areYesNoLabels(['branched', 'unbranched']) // → true
 * areYesNoLabels(['5', 'n.d.']) // → false
 */
export function areYesNoLabels(values: readonly string[]): boolean {
  const readsAsNumber = (value: string) => {
    const text = value.trim()
    return text !== '' && Number.isFinite(Number(text.replace(',', '.')))
  }
  return values.length === 2 && !values.some(readsAsNumber)
}

export interface BinaryReading {
  /** 1 for the value counted as yes, 0 for the other, NaN for a missing value (code −1). */
  values: Float64Array
  /** The value counted as yes, as the column writes it. */
  positive: string
  /** The other value; null when no row holds one. */
  negative: string | null
}

export type BinaryProblem =
  | {
      /** A third distinct value: the row (index into the codes) where it first occurs. */
      kind: 'third-value'
      row: number
      value: string
      /** The two values seen before it. */
      values: [string, string]
    }
  | {
      /** The value asked to count as yes is not among the column's values. */
      kind: 'unknown-positive'
      positive: string
      values: string[]
    }

/**
 * Turns a label column (codes into `labels`, −1 for missing, as the table readers produce) into
 * the 0/1 response of a binomial model. At most two distinct values may occur ("1" and "1.0" are
 * one); `positive` (null: defaultPositiveLabel of the values) names the one counted as yes.
 * Returns the problem instead of throwing, so each caller words it with its own row numbers.
 *
 * @example
 * readBinaryResponse(['no', 'yes'], Int32Array.of(0, 1, 1, -1), null)
 * // → { values: [0, 1, 1, NaN], positive: 'yes', negative: 'no' }
 */
export function readBinaryResponse(
  labels: readonly string[],
  codes: Int32Array,
  positive: string | null,
  toNumber: (text: string) => number = Number,
): BinaryReading | { problem: BinaryProblem } {
  // Distinct values by key, in order of first use by a row (labels may hold values no row uses).
  const keyOfLabel = labels.map((label) => keyOf(label, toNumber))
  const firstLabelOfKey = new Map<string, string>()
  for (let r = 0; r < codes.length; r++) {
    const code = codes[r]
    if (code < 0) continue
    const key = keyOfLabel[code]
    if (firstLabelOfKey.has(key)) continue
    if (firstLabelOfKey.size === 2) {
      const [a, b] = [...firstLabelOfKey.values()]
      return { problem: { kind: 'third-value', row: r, value: labels[code], values: [a, b] } }
    }
    firstLabelOfKey.set(key, labels[code])
  }
  const values = [...firstLabelOfKey.values()]
  let yesKey: string
  if (positive === null) {
    if (values.length === 0)
      return { values: new Float64Array(codes.length).fill(NaN), positive: '1', negative: null }
    yesKey = keyOf(defaultPositiveLabel(values, toNumber), toNumber)
  } else {
    yesKey = keyOf(positive, toNumber)
    if (!firstLabelOfKey.has(yesKey) && values.length === 2)
      return { problem: { kind: 'unknown-positive', positive, values } }
  }
  const yes = Float64Array.from(keyOfLabel, (key) => (key === yesKey ? 1 : 0))
  const out = new Float64Array(codes.length)
  for (let r = 0; r < codes.length; r++) out[r] = codes[r] < 0 ? NaN : yes[codes[r]]
  const negative = values.find((v) => keyOf(v, toNumber) !== yesKey) ?? null
  return { values: out, positive: firstLabelOfKey.get(yesKey) ?? positive!, negative }
}
