import { CsvTokenizer, fieldText } from './csv-tokenizer'
import type { DecimalMark } from '../rows-store/number-text'

/*
 * Kept apart from sniff.ts (which also detects encodings) so the command line can guess a table's
 * separator without loading the encoding detectors.
 */

const DELIMITERS = [',', ';', '\t', '|']

interface DelimiterScore {
  delimiter: string
  headerFields: number
  consistent: number
}

function scoreDelimiter(sample: Buffer, delimiter: string): DelimiterScore | null {
  const counts: number[] = []
  const tokenizer = new CsvTokenizer({
    delimiter,
    maxFieldChars: Number.MAX_SAFE_INTEGER,
    maxFieldsPerRow: Number.MAX_SAFE_INTEGER,
    onRow: (row) => {
      if (counts.length < 200) counts.push(row.count)
    },
  })
  try {
    tokenizer.push(sample)
    tokenizer.end()
  } catch {
    return null
  }
  if (counts.length === 0) return null
  const headerFields = counts[0]
  const rest = counts.slice(1)
  const consistent = rest.length === 0 ? 1 : rest.filter((c) => c === headerFields).length / rest.length
  return { delimiter, headerFields, consistent }
}

/**
 * The delimiter that gives the header more than one column and the most rows of the same width.
 * `sample` is the start of the file as UTF-8.
 */
export function guessDelimiter(sample: Buffer, ext: string): string {
  const preferred = ext === '.tsv' || ext === '.tab' ? '\t' : ','
  const scores = DELIMITERS.map((d) => scoreDelimiter(sample, d)).filter(
    (s): s is DelimiterScore => s !== null && s.headerFields > 1,
  )
  if (scores.length === 0) return preferred
  scores.sort(
    (a, b) =>
      b.consistent - a.consistent ||
      b.headerFields - a.headerFields ||
      Number(b.delimiter === preferred) - Number(a.delimiter === preferred),
  )
  return scores[0].delimiter
}

/** A decimal comma is only possible when the delimiter is not a comma; it wins when no cell uses a point. */
export function guessDecimalMark(sample: Buffer, delimiter: string): DecimalMark {
  if (delimiter === ',') return '.'
  let commas = 0
  let points = 0
  const tokenizer = new CsvTokenizer({
    delimiter,
    maxFieldChars: Number.MAX_SAFE_INTEGER,
    maxFieldsPerRow: Number.MAX_SAFE_INTEGER,
    onRow: (row, recordNo) => {
      if (recordNo === 1) return
      for (let k = 0; k < row.count; k++) {
        const value = fieldText(row, k).trim()
        if (/^[+-]?\d*,\d+$/.test(value)) commas++
        else if (/^[+-]?\d*\.\d+$/.test(value)) points++
      }
    },
  })
  try {
    tokenizer.push(sample)
    tokenizer.end()
  } catch {
    return '.'
  }
  return commas > 0 && points === 0 ? ',' : '.'
}
