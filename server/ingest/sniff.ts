import { extname } from 'node:path'
import iconv from 'iconv-lite'
import jschardet from 'jschardet'
import { guessDecimalMark, guessDelimiter } from './guess-delimiter'
import { badFile } from './ingest-errors'
import type { DecimalMark } from '../rows-store/number-text'

/** Bytes read from the start of a file to decide how to read the rest. */
export const SNIFF_BYTES = 64 * 1024

export interface TextSniff {
  fileType: 'csv'
  /** An iconv-lite / WHATWG encoding label: utf-8, utf-16le, utf-16be, windows-1252, … */
  encoding: string
  /** Byte-order mark to skip. */
  bomBytes: number
  delimiter: string
  decimalMark: DecimalMark
}

export interface WorkbookSniff {
  fileType: 'xlsx'
}

export type Sniff = TextSniff | WorkbookSniff

const TEXT_EXTENSIONS = new Set(['.csv', '.tsv', '.tab', '.txt'])
/** Encodings jschardet may name that are not Western European; trusted only when it is sure. */
const TRUSTED_DETECTIONS = new Set([
  'shift_jis',
  'euc-jp',
  'euc-kr',
  'gb2312',
  'big5',
  'windows-1251',
  'koi8-r',
  'iso-8859-7',
  'windows-1253',
  'iso-8859-8',
  'windows-1255',
])

const startsWith = (head: Buffer, bytes: number[]) => bytes.every((b, k) => head[k] === b)

/**
 * Decides from the first bytes what kind of file this is and how to read it: workbook or text,
 * encoding (BOM, UTF-16 byte pattern, UTF-8 validity, then jschardet), delimiter and decimal mark.
 * Refuses files that are not tables with a message that says what they are.
 */
export function sniffFile(head: Buffer, filename: string, totalBytes: number): Sniff {
  if (totalBytes === 0) throw badFile('EMPTY_FILE', 'The file is empty.')
  const ext = extname(filename).toLowerCase()
  const isZip = startsWith(head, [0x50, 0x4b, 0x03, 0x04])
  const isOle = startsWith(head, [0xd0, 0xcf, 0x11, 0xe0])
  // A workbook saved with a password is wrapped, encrypted, in the older compound-file container.
  if (ext === '.xlsx' && isOle) {
    throw badFile(
      'ENCRYPTED_WORKBOOK',
      `"${filename}" is protected with a password. Save it again without a password, or export the sheet as CSV, then upload that.`,
    )
  }
  if (ext === '.xls' || isOle) {
    throw badFile(
      'OLD_EXCEL_FORMAT',
      `"${filename}" is in the old Excel format (.xls). Open it in Excel or LibreOffice and save it as .xlsx or CSV, then upload that.`,
    )
  }
  if (ext === '.xlsx') {
    if (!isZip)
      throw badFile(
        'BROKEN_WORKBOOK',
        `"${filename}" is named .xlsx but is not an Excel workbook. Save it again from the spreadsheet program, or as CSV.`,
      )
    return { fileType: 'xlsx' }
  }
  if (!TEXT_EXTENSIONS.has(ext)) {
    throw badFile(
      'UNSUPPORTED_FILE_TYPE',
      `Nestwise reads tables saved as .csv, .tsv, .txt or .xlsx; "${filename}" is not one of these.`,
    )
  }
  if (isZip) {
    throw badFile(
      'WORKBOOK_AS_TEXT',
      `"${filename}" is an Excel workbook (or another zipped file) with a ${ext} name. Upload the workbook with its .xlsx name, or export the sheet as CSV.`,
    )
  }
  const { encoding, bomBytes } = detectEncoding(head)
  const body = head.subarray(bomBytes)
  const complete = head.length >= totalBytes
  const text = decodeSample(body, encoding, complete)
  if (looksBinary(text)) {
    throw badFile(
      'BINARY_FILE',
      `"${filename}" does not contain text: it looks like a binary file (an image, PDF or program data). Export the table as CSV or .xlsx.`,
    )
  }
  const sample = Buffer.from(text, 'utf8')
  const delimiter = guessDelimiter(sample, ext)
  return { fileType: 'csv', encoding, bomBytes, delimiter, decimalMark: guessDecimalMark(sample, delimiter) }
}

export function detectEncoding(head: Buffer): { encoding: string; bomBytes: number } {
  if (startsWith(head, [0xef, 0xbb, 0xbf])) return { encoding: 'utf-8', bomBytes: 3 }
  if (startsWith(head, [0xff, 0xfe])) return { encoding: 'utf-16le', bomBytes: 2 }
  if (startsWith(head, [0xfe, 0xff])) return { encoding: 'utf-16be', bomBytes: 2 }
  // UTF-16 without a BOM: ASCII text leaves every other byte zero.
  const probe = head.subarray(0, 4096)
  let zeroEven = 0
  let zeroOdd = 0
  for (let k = 0; k < probe.length; k++) {
    if (probe[k] !== 0) continue
    if (k % 2 === 0) zeroEven++
    else zeroOdd++
  }
  const half = probe.length / 2
  if (half >= 2 && zeroOdd > 0.3 * half && zeroEven < 0.05 * half)
    return { encoding: 'utf-16le', bomBytes: 0 }
  if (half >= 2 && zeroEven > 0.3 * half && zeroOdd < 0.05 * half)
    return { encoding: 'utf-16be', bomBytes: 0 }
  if (isValidUtf8Prefix(head)) return { encoding: 'utf-8', bomBytes: 0 }
  const guess = jschardet.detect(head.subarray(0, 16 * 1024))
  const name = guess.encoding?.toLowerCase()
  if (name && guess.confidence >= 0.8 && TRUSTED_DETECTIONS.has(name) && iconv.encodingExists(name))
    return { encoding: name, bomBytes: 0 }
  // Excel on Windows in Western Europe and the Americas writes Windows-1252 (a superset of Latin-1's printable range).
  return { encoding: 'windows-1252', bomBytes: 0 }
}

/** True when the bytes are UTF-8, allowing a character cut off at the end of the sample. */
export function isValidUtf8Prefix(bytes: Buffer): boolean {
  try {
    new TextDecoder('utf-8', { fatal: true }).decode(bytes, { stream: true })
    return true
  } catch {
    return false
  }
}

function decodeSample(body: Buffer, encoding: string, complete: boolean): string {
  const text =
    encoding === 'utf-8'
      ? new TextDecoder('utf-8').decode(body, { stream: !complete })
      : iconv.decode(body, encoding)
  if (complete) return text
  // Drop the last, probably cut, line.
  const lastBreak = Math.max(text.lastIndexOf('\n'), text.lastIndexOf('\r'))
  return lastBreak > 0 ? text.slice(0, lastBreak + 1) : text
}

function looksBinary(text: string): boolean {
  let control = 0
  const n = Math.min(text.length, 16 * 1024)
  for (let k = 0; k < n; k++) {
    const c = text.charCodeAt(k)
    if (c === 0) return true
    if (c < 32 && c !== 9 && c !== 10 && c !== 13) control++
    else if (c === 0xfffd) control++
  }
  return n > 0 && control / n > 0.02
}
