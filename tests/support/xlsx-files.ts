import { repeated, writeZip, type ZipEntry } from './zip-writer'

/**
 * Workbooks written part by part, for the reader's tests and the archive-bomb benchmark: ordinary
 * ones from rows, and hostile ones whose parts inflate far beyond their compressed size. Nothing
 * big is committed; each file is made when a test or benchmark needs it.
 */

const CONTENT_TYPES = `<?xml version="1.0" encoding="UTF-8" standalone="yes"?>
<Types xmlns="http://schemas.openxmlformats.org/package/2006/content-types"><Default Extension="rels" ContentType="application/vnd.openxmlformats-package.relationships+xml"/><Default Extension="xml" ContentType="application/xml"/><Override PartName="/xl/workbook.xml" ContentType="application/vnd.openxmlformats-officedocument.spreadsheetml.sheet.main+xml"/></Types>`

const ROOT_RELS = `<?xml version="1.0" encoding="UTF-8" standalone="yes"?>
<Relationships xmlns="http://schemas.openxmlformats.org/package/2006/relationships"><Relationship Id="rId1" Type="http://schemas.openxmlformats.org/officeDocument/2006/relationships/officeDocument" Target="xl/workbook.xml"/></Relationships>`

const NS = 'xmlns="http://schemas.openxmlformats.org/spreadsheetml/2006/main"'
const REL_NS = 'xmlns:r="http://schemas.openxmlformats.org/officeDocument/2006/relationships"'

export const escapeXml = (text: string) =>
  text.replaceAll('&', '&amp;').replaceAll('<', '&lt;').replaceAll('>', '&gt;').replaceAll('"', '&quot;')

export interface SheetSpec {
  name: string
  /** The sheet's XML in pieces (use sheetXml for ordinary rows). */
  xml: () => Iterable<string>
  declaredSize?: number
}

export interface WorkbookSpec {
  sheets: SheetSpec[]
  /** Shared strings part in pieces, when the workbook has one. */
  sharedStrings?: () => Iterable<string>
  sharedStringsDeclaredSize?: number
  /** styles.xml; the default has style 1 as a date (number format 14). */
  styles?: string
  date1904?: boolean
  /** Other parts, written as they are. */
  extra?: ZipEntry[]
}

const DEFAULT_STYLES = `<?xml version="1.0" encoding="UTF-8" standalone="yes"?>
<styleSheet ${NS}><numFmts count="1"><numFmt numFmtId="164" formatCode="&quot;day&quot; yyyy-mm-dd"/></numFmts><cellXfs count="4"><xf numFmtId="0"/><xf numFmtId="14" applyNumberFormat="1"/><xf numFmtId="164" applyNumberFormat="1"/><xf numFmtId="2" applyNumberFormat="1"/></cellXfs></styleSheet>`

/** Writes the workbook as an .xlsx archive: sheets in the given order, named as given. */
export function writeWorkbook(spec: WorkbookSpec): Promise<Buffer> {
  const sheets = spec.sheets
    .map((s, k) => `<sheet name="${escapeXml(s.name)}" sheetId="${k + 1}" r:id="rId${k + 1}"/>`)
    .join('')
  const workbook = `<?xml version="1.0" encoding="UTF-8" standalone="yes"?>
<workbook ${NS} ${REL_NS}><workbookPr${spec.date1904 ? ' date1904="1"' : ''}/><sheets>${sheets}</sheets></workbook>`
  const rels = spec.sheets
    .map(
      (_, k) =>
        `<Relationship Id="rId${k + 1}" Type="http://schemas.openxmlformats.org/officeDocument/2006/relationships/worksheet" Target="worksheets/sheet${k + 1}.xml"/>`,
    )
    .join('')
  const n = spec.sheets.length
  const workbookRels = `<?xml version="1.0" encoding="UTF-8" standalone="yes"?>
<Relationships xmlns="http://schemas.openxmlformats.org/package/2006/relationships">${rels}<Relationship Id="rId${n + 1}" Type="http://schemas.openxmlformats.org/officeDocument/2006/relationships/styles" Target="styles.xml"/>${
    spec.sharedStrings
      ? `<Relationship Id="rId${n + 2}" Type="http://schemas.openxmlformats.org/officeDocument/2006/relationships/sharedStrings" Target="sharedStrings.xml"/>`
      : ''
  }</Relationships>`
  const one = (text: string) => () => [text]
  const entries: ZipEntry[] = [
    { name: '[Content_Types].xml', chunks: one(CONTENT_TYPES) },
    { name: '_rels/.rels', chunks: one(ROOT_RELS) },
    { name: 'xl/workbook.xml', chunks: one(workbook) },
    { name: 'xl/_rels/workbook.xml.rels', chunks: one(workbookRels) },
    { name: 'xl/styles.xml', chunks: one(spec.styles ?? DEFAULT_STYLES) },
    ...spec.sheets.map((s, k) => ({
      name: `xl/worksheets/sheet${k + 1}.xml`,
      chunks: s.xml,
      declaredSize: s.declaredSize,
    })),
  ]
  if (spec.sharedStrings)
    entries.push({
      name: 'xl/sharedStrings.xml',
      chunks: spec.sharedStrings,
      declaredSize: spec.sharedStringsDeclaredSize,
    })
  return writeZip([...entries, ...(spec.extra ?? [])])
}

/** A cell as written into a sheet: text goes inline unless given as XML already. */
export type CellSpec = string | number | boolean | null | { xml: string }

function columnLetters(index: number): string {
  let n = index + 1
  let out = ''
  while (n > 0) {
    const rest = (n - 1) % 26
    out = String.fromCharCode(65 + rest) + out
    n = Math.floor((n - 1) / 26)
  }
  return out
}

export function cellXml(value: CellSpec, ref: string): string {
  if (value === null) return ''
  if (typeof value === 'object') return value.xml.replace('<c ', `<c r="${ref}" `)
  if (typeof value === 'number') return `<c r="${ref}"><v>${value}</v></c>`
  if (typeof value === 'boolean') return `<c r="${ref}" t="b"><v>${value ? 1 : 0}</v></c>`
  return `<c r="${ref}" t="inlineStr"><is><t>${escapeXml(value)}</t></is></c>`
}

/** Sheet XML for rows of cells (row 1 first; a null row is left out, as spreadsheets do with empty rows). */
export function sheetXml(rows: (CellSpec[] | null)[]): () => Iterable<string> {
  return function* () {
    yield `<?xml version="1.0" encoding="UTF-8" standalone="yes"?>\n<worksheet ${NS}><sheetData>`
    for (let r = 0; r < rows.length; r++) {
      const row = rows[r]
      if (!row) continue
      const cells = row.map((value, c) => cellXml(value, `${columnLetters(c)}${r + 1}`)).join('')
      yield `<row r="${r + 1}">${cells}</row>`
    }
    yield '</sheetData></worksheet>'
  }
}

/** Shared strings part for the given texts (index = position). */
export function sharedStringsXml(texts: string[]): () => Iterable<string> {
  return function* () {
    yield `<?xml version="1.0" encoding="UTF-8" standalone="yes"?>\n<sst ${NS} count="${texts.length}" uniqueCount="${texts.length}">`
    for (const text of texts) yield `<si><t xml:space="preserve">${escapeXml(text)}</t></si>`
    yield '</sst>'
  }
}

const smallSheet = sheetXml([
  ['lab', 'mouse', 'length'],
  ['Nimbus', 'm1', 1.5],
  ['Fernhill', 'm2', 2.5],
])

// ---------------------------------------------------------------- hostile workbooks

/** A shared-strings part of `count` one-letter entries: 30 M of them unpack to about 540 MB. */
export function sharedStringsBomb(count: number, options: { lie?: boolean } = {}): Promise<Buffer> {
  const sheet = sheetXml([
    [{ xml: '<c t="s"><v>0</v></c>' }, 'length'],
    [{ xml: '<c t="s"><v>1</v></c>' }, 1],
    [{ xml: '<c t="s"><v>2</v></c>' }, 2],
  ])
  return writeWorkbook({
    sheets: [{ name: 'Cells', xml: sheet }],
    sharedStrings: function* () {
      yield `<?xml version="1.0" encoding="UTF-8" standalone="yes"?>\n<sst ${NS}>`
      yield* repeated('<si><t>x</t></si>', count)
      yield '</sst>'
    },
    sharedStringsDeclaredSize: options.lie ? 4096 : undefined,
  })
}

/** One cell of `chars` characters, kept as a shared string or written inline in the sheet. */
export function hugeCellWorkbook(
  chars: number,
  where: 'shared' | 'inline',
  options: { lie?: boolean } = {},
): Promise<Buffer> {
  const huge = function* () {
    yield* repeated('a', chars)
  }
  if (where === 'shared') {
    return writeWorkbook({
      sheets: [
        {
          name: 'Cells',
          xml: sheetXml([
            ['lab', 'note'],
            ['Nimbus', { xml: '<c t="s"><v>0</v></c>' }],
            ['Fernhill', 'short'],
          ]),
        },
      ],
      sharedStrings: function* () {
        yield `<?xml version="1.0" encoding="UTF-8" standalone="yes"?>\n<sst ${NS}><si><t>`
        yield* huge()
        yield '</t></si></sst>'
      },
      sharedStringsDeclaredSize: options.lie ? 4096 : undefined,
    })
  }
  return writeWorkbook({
    sheets: [
      {
        name: 'Cells',
        xml: function* () {
          yield `<?xml version="1.0" encoding="UTF-8" standalone="yes"?>\n<worksheet ${NS}><sheetData>`
          yield '<row r="1"><c r="A1" t="inlineStr"><is><t>lab</t></is></c><c r="B1" t="inlineStr"><is><t>note</t></is></c></row>'
          yield '<row r="2"><c r="A2" t="inlineStr"><is><t>Nimbus</t></is></c><c r="B2" t="inlineStr"><is><t>'
          yield* huge()
          yield '</t></is></c></row></sheetData></worksheet>'
        },
        declaredSize: options.lie ? 4096 : undefined,
      },
    ],
  })
}

/** A sheet padded with `count` empty elements the reader has no use for (`bytes` ≈ 9 × count). */
export function paddedSheetBomb(count: number, options: { lie?: boolean } = {}): Promise<Buffer> {
  return writeWorkbook({
    sheets: [
      {
        name: 'Cells',
        xml: function* () {
          const rows = [...smallSheet()]
          yield rows.slice(0, -1).join('')
          yield '</sheetData><extLst>'
          yield* repeated('<ext/>', count)
          yield '</extLst></worksheet>'
        },
        declaredSize: options.lie ? 4096 : undefined,
      },
    ],
  })
}

/** An ordinary small workbook (three columns, two data rows). */
export function smallWorkbook(): Promise<Buffer> {
  return writeWorkbook({ sheets: [{ name: 'Cells', xml: smallSheet }] })
}

/** An ordinary workbook of `rows` invented cells (lab, mouse, treatment, length), labels as shared strings. */
export function cellsWorkbook(rows: number): Promise<Buffer> {
  const labels = ['lab', 'mouse', 'treatment', 'neurite_length_um', 'Nimbus', 'Fernhill', 'vehicle', 'NW-117']
  const mice = Array.from({ length: 40 }, (_, k) => `m${k + 1}`)
  const texts = [...labels, ...mice]
  const shared = (index: number) => ({ xml: `<c t="s"><v>${index}</v></c>` })
  return writeWorkbook({
    sheets: [
      {
        name: 'Cells',
        xml: sheetXml([
          [shared(0), shared(1), shared(2), shared(3)],
          ...Array.from({ length: rows }, (_, r) => {
            const mouse = r % 40
            return [
              shared(4 + (mouse % 2)),
              shared(8 + mouse),
              shared(6 + ((mouse >> 1) % 2)),
              100 + ((r * 37) % 50) + 0.25,
            ]
          }),
        ]),
      },
    ],
    sharedStrings: sharedStringsXml(texts),
  })
}
