import { createReadStream } from 'node:fs'
import { open } from 'node:fs/promises'
import type { Knex } from 'knex'
import { ingestConfig, type WorkbookLimits } from './ingest-config'
import { sniffFile, SNIFF_BYTES, type TextSniff } from './sniff'
import { FastPathBlocked, storeCsv, type ByteSource, type CsvMode } from './store-csv'
import { NotUtf8 } from './text-decoding'
import { storeWorkbook } from './store-workbook'
import type { IntakeLimits, IntakeResult } from './table-intake'
import type { ProgressSink } from './progress-sink'
import type { DecimalMark } from '../rows-store/number-text'

export interface UploadedFile {
  /** Where the complete file is (for a live upload: where it is being written). */
  path: string
  originalName: string
  /** Bytes on disk; for a live upload, the size the request announced until the transfer ends. */
  size: number
  live?: LiveUpload
}

/** The chunks of an upload still in transfer, as the intake hands them over (uploads/chunk-channel). */
export interface LiveChunks extends AsyncIterable<Buffer> {
  /** The first `bytes` bytes (fewer when the file is shorter: then `complete`), without consuming them. */
  peek(bytes: number): Promise<{ head: Buffer; complete: boolean }>
  /** Stops taking chunks: the transfer goes on to disk only. */
  detach(): void
}

/** An upload still in transfer: its chunks as they arrive, and the go-ahead once it completed. */
export interface LiveUpload {
  channel: LiveChunks
  /** Resolves with the final size when the whole file is on disk and the request was accepted; rejects otherwise. */
  accepted: Promise<number>
}

export interface IngestOutcome {
  sha256: string
  fileType: 'csv' | 'xlsx'
  encoding: string
  delimiter: string | null
  decimalMark: DecimalMark
  sheetName: string | null
  sheetNames: string[]
  intake: IntakeResult
  /** How the rows reached PostgreSQL (for the log and the benchmark). */
  mode: CsvMode | 'workbook'
  fallbackReason: string | null
}

export const defaultLimits = (): IntakeLimits => ({
  maxColumns: ingestConfig.maxColumns,
  maxFieldChars: ingestConfig.maxFieldChars,
  maxNameChars: ingestConfig.maxNameChars,
  naValues: ingestConfig.naValues,
  distinctCap: ingestConfig.distinctCap,
})

async function readHead(path: string): Promise<Buffer> {
  const handle = await open(path, 'r')
  try {
    const buffer = Buffer.alloc(SNIFF_BYTES)
    const { bytesRead } = await handle.read(buffer, 0, SNIFF_BYTES, 0)
    return buffer.subarray(0, bytesRead)
  } finally {
    await handle.close()
  }
}

/**
 * Stores an uploaded file as the rows table of `versionId`, inside `trx`, and returns what it found.
 * CSV goes the fast way first (the original bytes into COPY); if that cannot work for this file the
 * attempt is rolled back to a savepoint and the file is read again, storing the parsed rows. A file
 * that turns out not to be UTF-8 past the sniffed sample is read again as Windows-1252.
 */
const diskSource = (path: string, size: number): ByteSource => ({
  chunks: () => createReadStream(path, { highWaterMark: 256 * 1024 }) as AsyncIterable<Buffer>,
  expectedBytes: size,
})

/**
 * Stores an uploaded file as the rows table of `versionId`, inside `trx`, and returns what it found.
 * CSV goes the fast way first (the original bytes into COPY), straight from the transfer when the
 * upload is live; if that cannot work for this file the attempt is rolled back to a savepoint and
 * the file is read again from disk, storing the parsed rows. A file that turns out not to be UTF-8
 * past the sniffed sample is read again as Windows-1252.
 */
export async function ingestFile(
  trx: Knex.Transaction,
  versionId: number,
  file: UploadedFile,
  options: { sheet?: string; limits?: IntakeLimits; workbookLimits?: WorkbookLimits; progress: ProgressSink },
): Promise<IngestOutcome> {
  const limits = options.limits ?? defaultLimits()
  const live = file.live
  try {
    options.progress.update({ phase: 'checking', bytesTotal: file.size })
    let head: Buffer
    let total = file.size
    if (live) {
      const peeked = await live.channel.peek(SNIFF_BYTES)
      head = peeked.head
      if (peeked.complete) total = head.length
    } else head = await readHead(file.path)
    const sniff = sniffFile(head, file.originalName, total)
    // Reading again (another sheet reader, a fallback) needs the whole file on disk.
    const fromDisk = async (): Promise<ByteSource> => {
      if (!live) return diskSource(file.path, file.size)
      live.channel.detach()
      return diskSource(file.path, await live.accepted)
    }
    if (sniff.fileType === 'xlsx') {
      if (live) await fromDisk()
      const stored = await trx.transaction((sp) =>
        storeWorkbook(sp, {
          versionId,
          path: file.path,
          sheet: options.sheet,
          limits,
          workbookLimits: options.workbookLimits ?? ingestConfig.workbook,
          progress: options.progress,
        }),
      )
      return {
        ...stored,
        fileType: 'xlsx',
        encoding: 'xlsx',
        delimiter: null,
        decimalMark: '.',
        mode: 'workbook',
        fallbackReason: null,
      }
    }
    let text: TextSniff = sniff
    let mode: CsvMode = 'original-bytes'
    let fallbackReason: string | null = null
    let source: ByteSource = live
      ? { chunks: () => live.channel, expectedBytes: file.size }
      : diskSource(file.path, file.size)
    for (let attempt = 0; attempt < 3; attempt++) {
      try {
        const stored = await trx.transaction((sp) =>
          storeCsv(sp, versionId, source, text, mode, limits, options.progress),
        )
        return {
          ...stored,
          fileType: 'csv',
          encoding: text.encoding,
          delimiter: text.delimiter,
          decimalMark: text.decimalMark,
          sheetName: null,
          sheetNames: [],
          mode,
          fallbackReason,
        }
      } catch (error) {
        if (error instanceof FastPathBlocked && mode === 'original-bytes') {
          mode = 'parsed-rows'
          fallbackReason = error.message
        } else if (error instanceof NotUtf8 && text.encoding === 'utf-8') {
          text = { ...text, encoding: 'windows-1252' }
          fallbackReason = 'not UTF-8 beyond the first bytes'
        } else throw error
        source = await fromDisk()
      }
    }
    throw new Error('ingest did not settle on a way to read the file')
  } finally {
    // Never leave the transfer waiting on a reader that has stopped.
    live?.channel.detach()
  }
}
