import { open } from 'node:fs/promises'
import type { Knex } from 'knex'
import { ingestConfig } from './ingest-config'
import { sniffFile, SNIFF_BYTES, type TextSniff } from './sniff'
import { FastPathBlocked, NotUtf8, storeCsv, type CsvMode } from './store-csv'
import { storeWorkbook } from './store-workbook'
import type { IntakeLimits, IntakeResult } from './table-intake'
import type { ProgressSink } from './upload-progress'
import type { DecimalMark } from './number-text'

export interface UploadedFile {
  path: string
  originalName: string
  size: number
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
export async function ingestFile(
  trx: Knex.Transaction,
  versionId: number,
  file: UploadedFile,
  options: { sheet?: string; limits?: IntakeLimits; progress: ProgressSink },
): Promise<IngestOutcome> {
  const limits = options.limits ?? defaultLimits()
  options.progress.update({ phase: 'checking', bytesTotal: file.size })
  const sniff = sniffFile(await readHead(file.path), file.originalName, file.size)
  if (sniff.fileType === 'xlsx') {
    const stored = await trx.transaction((sp) =>
      storeWorkbook(sp, versionId, file.path, options.sheet, limits, options.progress),
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
  for (let attempt = 0; attempt < 3; attempt++) {
    try {
      const stored = await trx.transaction((sp) =>
        storeCsv(sp, versionId, file.path, text, mode, limits, options.progress),
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
    }
  }
  throw new Error('ingest did not settle on a way to read the file')
}
