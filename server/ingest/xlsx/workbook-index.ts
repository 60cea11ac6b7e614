import { posix } from 'node:path'
import { badFile } from '../ingest-errors'
import { readXml, type XmlGuard } from './xml-reader'
import type { ZipParts } from './zip-parts'

/**
 * What a workbook says about itself: its sheets in order (name and part), where its shared texts
 * are, which cell styles show a number as a date, and whether dates count from 1904.
 */
export interface WorkbookIndex {
  sheets: { name: string; part: string }[]
  sharedStringsPart: string | null
  /** Style index → true when that style formats numbers as dates or times. */
  dateStyles: boolean[]
  date1904: boolean
}

/** Built-in number formats that show dates or times (ECMA-376 part 1, 18.8.30; 27–36 and 50–58 are East Asian dates). */
const BUILT_IN_DATE_FORMATS = new Set([
  14, 15, 16, 17, 18, 19, 20, 21, 22, 27, 28, 29, 30, 31, 32, 33, 34, 35, 36, 45, 46, 47, 50, 51, 52, 53, 54,
  55, 56, 57, 58,
])

/** A format code shows a date when, outside quotes and [brackets], it has a date or time letter. */
export function isDateFormatCode(code: string): boolean {
  const bare = code
    .replace(/\[[^\]]*]/g, '')
    .replace(/"[^"]*"/g, '')
    .replace(/\\./g, '')
  return /[ymdhsYMDHS]/.test(bare)
}

function broken(what: string): Error {
  return badFile(
    'BROKEN_WORKBOOK',
    `The workbook could not be read: ${what}. Open it in the spreadsheet program and save it again, or export the sheet as CSV.`,
  )
}

/** Relationship targets are relative to the part's folder unless they start with "/". */
function resolveTarget(from: string, target: string): string {
  if (target.startsWith('/')) return target.slice(1)
  return posix.normalize(posix.join(posix.dirname(from), target))
}

function relsPathOf(part: string): string {
  return posix.join(posix.dirname(part), '_rels', `${posix.basename(part)}.rels`)
}

async function readRelationships(
  parts: ZipParts,
  part: string,
  guard: XmlGuard,
): Promise<Map<string, { type: string; target: string }>> {
  const out = new Map<string, { type: string; target: string }>()
  const rels = relsPathOf(part)
  if (!parts.has(rels)) return out
  await readXml(
    parts.text(rels, 'relationships'),
    {
      open(name, a) {
        if (name === 'Relationship' && a.Id && a.Target && a.TargetMode !== 'External')
          out.set(a.Id, { type: a.Type ?? '', target: resolveTarget(part, a.Target) })
      },
      text() {},
      close() {},
    },
    guard,
  )
  return out
}

async function mainPart(parts: ZipParts, guard: XmlGuard): Promise<string> {
  const root = await readRelationships(parts, '', guard).catch(() => new Map())
  for (const { type, target } of root.values())
    if (type.endsWith('/officeDocument') && parts.has(target)) return target
  if (parts.has('xl/workbook.xml')) return 'xl/workbook.xml'
  throw broken('it has no workbook part')
}

async function readStyles(parts: ZipParts, part: string | undefined, guard: XmlGuard): Promise<boolean[]> {
  if (!part || !parts.has(part)) return []
  const customDates = new Set<number>()
  const formats: number[] = []
  let inCellXfs = false
  await readXml(
    parts.text(part, 'cell styles'),
    {
      open(name, a) {
        if (name === 'numFmt' && a.formatCode !== undefined && isDateFormatCode(a.formatCode))
          customDates.add(Number(a.numFmtId))
        else if (name === 'cellXfs') inCellXfs = true
        else if (name === 'xf' && inCellXfs) formats.push(Number(a.numFmtId ?? 0))
      },
      text() {},
      close(name) {
        if (name === 'cellXfs') inCellXfs = false
      },
    },
    guard,
  )
  return formats.map((id) => BUILT_IN_DATE_FORMATS.has(id) || customDates.has(id))
}

export async function readWorkbookIndex(parts: ZipParts, guard: XmlGuard): Promise<WorkbookIndex> {
  const workbook = await mainPart(parts, guard)
  const rels = await readRelationships(parts, workbook, guard)
  const listed: { name: string; rId: string }[] = []
  let date1904 = false
  await readXml(
    parts.text(workbook, 'the list of sheets'),
    {
      open(name, a) {
        // The relationship id is r:id, whatever prefix the writer gave its namespace.
        if (name === 'sheet' && a.name !== undefined)
          listed.push({ name: a.name, rId: Object.entries(a).find(([k]) => k.endsWith(':id'))?.[1] ?? '' })
        else if (name === 'workbookPr') date1904 = a.date1904 === '1' || a.date1904 === 'true'
      },
      text() {},
      close() {},
    },
    guard,
  )
  const byType = (suffix: string) => [...rels.values()].find((r) => r.type.endsWith(suffix))?.target
  const sheets = listed.map((s, k) => {
    const target = rels.get(s.rId)?.target
    // Without a relationship, the conventional name of the k-th sheet.
    return { name: s.name, part: target && parts.has(target) ? target : `xl/worksheets/sheet${k + 1}.xml` }
  })
  if (!sheets.length) throw badFile('BROKEN_WORKBOOK', 'The workbook has no sheets.')
  const shared =
    byType('/sharedStrings') ?? (parts.has('xl/sharedStrings.xml') ? 'xl/sharedStrings.xml' : null)
  return {
    sheets,
    sharedStringsPart: shared && parts.has(shared) ? shared : null,
    dateStyles: await readStyles(parts, byType('/styles') ?? 'xl/styles.xml', guard),
    date1904,
  }
}
