import type { WorkbookLimits } from '../ingest-config'
import { badFile } from '../ingest-errors'
import { readXml, type XmlGuard } from './xml-reader'
import { limitHit, megabytes, type ZipParts } from './zip-parts'

/**
 * The texts a workbook's sheets share (cells refer to them by number). Read whole before the sheet,
 * within the limits: the part's unpacked size, the number of texts, and the length of each. Phonetic
 * guides (rPh) are not part of a cell's text.
 */
export async function readSharedStrings(
  parts: ZipParts,
  part: string,
  limits: WorkbookLimits,
  maxCellChars: number,
  guard: XmlGuard,
): Promise<string[]> {
  const texts: string[] = []
  let inItem = false
  let inText = false
  let phonetic = 0
  let current = ''
  await readXml(
    parts.text(part, 'the texts the sheets share', {
      bytes: limits.sharedStringsBytes,
      limit: 'sharedStringsBytes',
    }),
    {
      open(name) {
        if (name === 'si') {
          inItem = true
          current = ''
        } else if (name === 'rPh') phonetic++
        else if (name === 't' && inItem && phonetic === 0) inText = true
      },
      text(text) {
        if (!inText) return
        current += text
        if (current.length > maxCellChars) throw tooLong(texts.length + 1, maxCellChars)
      },
      close(name) {
        if (name === 't') inText = false
        else if (name === 'rPh') phonetic--
        else if (name === 'si') {
          inItem = false
          if (texts.length >= limits.sharedStrings)
            throw limitHit(
              'sharedStrings',
              `The workbook lists more than ${limits.sharedStrings.toLocaleString('en-US')} shared texts, the most Nestwise reads (its shared-text part is ${megabytes(limits.sharedStringsBytes)} at most).`,
            )
          texts.push(current)
        }
      },
    },
    guard,
  )
  return texts
}

export function tooLong(textNumber: number, maxCellChars: number): Error {
  return badFile(
    'FIELD_TOO_LONG',
    `The workbook holds a text longer than ${maxCellChars.toLocaleString('en-US')} characters (shared text ${textNumber.toLocaleString('en-US')}), the most Nestwise accepts in one cell. Shorten it, or export the sheet as CSV without that column.`,
    { limit: 'cellChars' },
  )
}
