import type { Readable } from 'node:stream'
import yauzl from 'yauzl'
import type { WorkbookLimits } from '../ingest-config'
import { badFile } from '../ingest-errors'

/**
 * The parts of an .xlsx archive on disk, read through the archive's table of contents (so any part
 * can be read in any order, and parts we do not need are never unpacked). Every unpacked byte is
 * counted against the workbook limits while it arrives: a part's stated size is checked before it
 * is opened, and a part that unpacks to more than it states is stopped at that point.
 */
export interface ZipParts {
  names(): string[]
  has(name: string): boolean
  /** Unpacked size the archive states for the part (0 when it has no such part). */
  statedSize(name: string): number
  /** The part as UTF-8 text, in pieces as it unpacks, within the part limit (or the tighter one given). */
  text(name: string, what: string, tighter?: PartCap): AsyncIterable<string>
  close(): void
}

const MB = 1024 * 1024
export const megabytes = (bytes: number) =>
  bytes < MB
    ? `${Math.ceil(bytes / 1024).toLocaleString('en-US')} KB`
    : `${(bytes / MB).toLocaleString('en-US', { maximumFractionDigits: bytes < 10 * MB ? 1 : 0 })} MB`

/** Limits that follow UPLOAD_MAX_MB (the others are fixed). */
const FOLLOWS_UPLOAD_LIMIT = new Set(['partBytes', 'totalBytes', 'sharedStringsBytes', 'sharedStrings'])

/** A workbook limit was reached: 400 naming the limit, the part and the numbers. */
export function limitHit(limit: string, message: string) {
  const note = FOLLOWS_UPLOAD_LIMIT.has(limit) ? ' The limits follow the upload limit (UPLOAD_MAX_MB).' : ''
  return badFile('WORKBOOK_LIMIT', `${message}${note}`, { limit })
}

function broken(): Error {
  return badFile(
    'BROKEN_WORKBOOK',
    'The workbook could not be read: its zip archive is damaged. Open it in the spreadsheet program and save it again, or export the sheet as CSV.',
  )
}

/** A limit tighter than partBytes for one part, and its name in ingestConfig.workbook. */
export interface PartCap {
  bytes: number
  limit: string
}

/** yauzl's complaint when a part inflates past the size it states. */
const TOO_MANY_BYTES = /too many bytes in the stream/

export async function openZipParts(path: string, limits: WorkbookLimits): Promise<ZipParts> {
  let zip: yauzl.ZipFile
  try {
    zip = await yauzl.openPromise(path, { lazyEntries: true, autoClose: false, strictFileNames: false })
  } catch {
    throw broken()
  }
  const entries = new Map<string, yauzl.Entry>()
  try {
    if (zip.entryCount > limits.entries)
      throw limitHit(
        'entries',
        `The workbook's archive holds ${zip.entryCount.toLocaleString('en-US')} files; an ordinary workbook has a few dozen, and Nestwise reads at most ${limits.entries.toLocaleString('en-US')}.`,
      )
    let stated = 0
    for (;;) {
      const entry = await new Promise<yauzl.Entry | null>((resolve, reject) => {
        zip.once('entry', resolve)
        zip.once('end', () => resolve(null))
        zip.once('error', reject)
        zip.readEntry()
      }).finally(() => zip.removeAllListeners('entry').removeAllListeners('end').removeAllListeners('error'))
      if (!entry) break
      stated += entry.uncompressedSize
      entries.set(entry.fileName.replace(/^\/+/, ''), entry)
    }
    if (stated > limits.totalBytes)
      throw limitHit(
        'totalBytes',
        `The workbook unpacks to ${megabytes(stated)}, more than the ${megabytes(limits.totalBytes)} Nestwise reads from one workbook.`,
      )
  } catch (error) {
    zip.close()
    if ((error as { status?: number }).status) throw error
    throw broken()
  }

  let unpacked = 0
  const open = new Set<Readable>()

  async function* text(name: string, what: string, tighter?: PartCap): AsyncGenerator<string> {
    const entry = entries.get(name)
    if (!entry) throw broken()
    const cap =
      tighter && tighter.bytes < limits.partBytes ? tighter : { bytes: limits.partBytes, limit: 'partBytes' }
    const partCap = cap.bytes
    const tooBig = (size: string) =>
      limitHit(
        cap.limit,
        `The workbook's part ${name} (${what}) unpacks to ${size}, more than the ${megabytes(partCap)} Nestwise reads for it.`,
      )
    if (entry.uncompressedSize > partCap) throw tooBig(megabytes(entry.uncompressedSize))
    if (
      entry.uncompressedSize > limits.ratioFloorBytes &&
      entry.uncompressedSize > limits.maxRatio * entry.compressedSize
    )
      throw limitHit(
        'ratio',
        `The workbook's part ${name} (${what}) unpacks to ${megabytes(entry.uncompressedSize)} from ${megabytes(entry.compressedSize)}, ${Math.round(entry.uncompressedSize / entry.compressedSize).toLocaleString('en-US')} times its packed size; spreadsheet programs write parts that unpack to about 10 times, and Nestwise reads none beyond ${limits.maxRatio} times.`,
      )
    if (entry.isEncrypted())
      throw badFile(
        'ENCRYPTED_WORKBOOK',
        'The workbook is protected with a password. Save it without a password, or export the sheet as CSV.',
      )
    let stream: Readable
    try {
      stream = await zip.openReadStreamPromise(entry)
    } catch {
      throw broken()
    }
    open.add(stream)
    const decoder = new TextDecoder('utf-8')
    let read = 0
    try {
      for await (const chunk of stream as AsyncIterable<Buffer>) {
        read += chunk.length
        unpacked += chunk.length
        if (read > partCap) throw tooBig(`more than ${megabytes(partCap)}`)
        if (unpacked > limits.totalBytes)
          throw limitHit(
            'totalBytes',
            `The parts read so far unpack to more than the ${megabytes(limits.totalBytes)} Nestwise reads from one workbook.`,
          )
        yield decoder.decode(chunk, { stream: true })
      }
      const rest = decoder.decode()
      if (rest) yield rest
    } catch (error) {
      if ((error as { status?: number }).status) throw error
      if (TOO_MANY_BYTES.test((error as Error).message ?? ''))
        throw limitHit(
          'statedSize',
          `The workbook's part ${name} (${what}) unpacks to more than the ${megabytes(entry.uncompressedSize)} its archive states: the file is damaged or made to exhaust memory.`,
        )
      throw broken()
    } finally {
      open.delete(stream)
      stream.destroy()
    }
  }

  return {
    names: () => [...entries.keys()],
    has: (name) => entries.has(name),
    statedSize: (name) => entries.get(name)?.uncompressedSize ?? 0,
    text,
    close: () => {
      for (const stream of open) stream.destroy()
      zip.close()
    },
  }
}
