/**
 * Sheet names of an .xlsx file, read in the browser before uploading so the person can pick the
 * sheet by name. An .xlsx is a ZIP archive; only its directory and xl/workbook.xml are read (a few
 * kilobytes, whatever the workbook's size). Returns null when the file is not a readable workbook:
 * the upload then falls back to a typed sheet name, and the server has the last word.
 */

const EOCD_SIGNATURE = 0x06054b50
const CENTRAL_SIGNATURE = 0x02014b50
const LOCAL_SIGNATURE = 0x04034b50
const MAX_COMMENT = 0xffff
const MAX_WORKBOOK_XML = 8 * 1024 * 1024

interface Blobish {
  size: number
  slice(start?: number, end?: number): Blob
}

async function bytes(file: Blobish, start: number, end: number): Promise<DataView> {
  return new DataView(await file.slice(Math.max(0, start), Math.min(file.size, end)).arrayBuffer())
}

function findEndOfDirectory(tail: DataView): number {
  for (let at = tail.byteLength - 22; at >= 0; at--) {
    if (tail.getUint32(at, true) === EOCD_SIGNATURE) return at
  }
  return -1
}

interface Entry {
  method: number
  compressedSize: number
  uncompressedSize: number
  localOffset: number
}

function findEntry(directory: DataView, wanted: string): Entry | null {
  const decoder = new TextDecoder()
  let at = 0
  while (at + 46 <= directory.byteLength && directory.getUint32(at, true) === CENTRAL_SIGNATURE) {
    const nameLength = directory.getUint16(at + 28, true)
    const extraLength = directory.getUint16(at + 30, true)
    const commentLength = directory.getUint16(at + 32, true)
    const name = decoder.decode(new Uint8Array(directory.buffer, directory.byteOffset + at + 46, nameLength))
    if (name === wanted) {
      return {
        method: directory.getUint16(at + 10, true),
        compressedSize: directory.getUint32(at + 20, true),
        uncompressedSize: directory.getUint32(at + 24, true),
        localOffset: directory.getUint32(at + 42, true),
      }
    }
    at += 46 + nameLength + extraLength + commentLength
  }
  return null
}

async function inflateRaw(data: Uint8Array<ArrayBuffer>): Promise<Uint8Array> {
  const stream = new Blob([data]).stream().pipeThrough(new DecompressionStream('deflate-raw'))
  return new Uint8Array(await new Response(stream).arrayBuffer())
}

const entities: Record<string, string> = { amp: '&', lt: '<', gt: '>', quot: '"', apos: "'" }

function decodeXmlText(text: string): string {
  return text.replace(/&(#x[0-9a-f]+|#\d+|amp|lt|gt|quot|apos);/gi, (_, ref: string) => {
    if (ref[0] !== '#') return entities[ref.toLowerCase()] ?? _
    const code = ref[1] === 'x' || ref[1] === 'X' ? parseInt(ref.slice(2), 16) : parseInt(ref.slice(1), 10)
    return Number.isFinite(code) ? String.fromCodePoint(code) : _
  })
}

/** Sheet names in workbook order, from the text of xl/workbook.xml. */
export function sheetNamesFromWorkbookXml(xml: string): string[] {
  const names: string[] = []
  for (const match of xml.matchAll(/<(?:[\w-]+:)?sheet\b[^>]*?\bname\s*=\s*(?:"([^"]*)"|'([^']*)')/g)) {
    names.push(decodeXmlText(match[1] ?? match[2] ?? ''))
  }
  return names
}

export async function readWorkbookSheetNames(file: Blobish): Promise<string[] | null> {
  try {
    const tail = await bytes(file, file.size - (22 + MAX_COMMENT), file.size)
    const end = findEndOfDirectory(tail)
    if (end < 0) return null
    const directorySize = tail.getUint32(end + 12, true)
    const directoryOffset = tail.getUint32(end + 16, true)
    const directory = await bytes(file, directoryOffset, directoryOffset + directorySize)
    const entry = findEntry(directory, 'xl/workbook.xml')
    if (!entry || entry.uncompressedSize > MAX_WORKBOOK_XML) return null

    const local = await bytes(file, entry.localOffset, entry.localOffset + 30)
    if (local.byteLength < 30 || local.getUint32(0, true) !== LOCAL_SIGNATURE) return null
    const dataStart = entry.localOffset + 30 + local.getUint16(26, true) + local.getUint16(28, true)
    const packed = new Uint8Array(await file.slice(dataStart, dataStart + entry.compressedSize).arrayBuffer())

    let raw: Uint8Array
    if (entry.method === 0) raw = packed
    else if (entry.method === 8 && typeof DecompressionStream !== 'undefined') raw = await inflateRaw(packed)
    else return null

    const names = sheetNamesFromWorkbookXml(new TextDecoder().decode(raw))
    return names.length ? names : null
  } catch {
    return null
  }
}

export function isWorkbookName(fileName: string): boolean {
  return /\.xlsx$/i.test(fileName)
}
