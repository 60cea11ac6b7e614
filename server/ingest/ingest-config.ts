import { join, resolve } from 'node:path'
import { z } from 'zod'
import { config } from '../config'

// Ingest settings beyond server/config.ts, read from the same environment (defaults shown in docs/api-datasets.md).
const IngestSettings = z.object({
  DATA_DIR: z.string().default('.data'),
  INGEST_MAX_COLUMNS: z.coerce.number().int().min(2).max(1500).default(500),
  INGEST_MAX_FIELD_CHARS: z.coerce.number().int().min(100).default(10_000),
  /** Comma-separated words read as "missing" besides an empty cell. */
  INGEST_NA_VALUES: z.string().default('NA,N/A,n/a,na,NaN,nan,NULL,null,#N/A,#NA,-'),
})

const settings = IngestSettings.parse(process.env)

const dataDir = resolve(settings.DATA_DIR)
const uploadMaxBytes = Math.round(config.UPLOAD_MAX_MB * 1024 * 1024)
const MB = 1024 * 1024

/**
 * What a workbook may unpack to. An .xlsx is a zip of XML parts that inflate many times over, so
 * the upload limit alone does not bound the work: these caps follow UPLOAD_MAX_MB (with floors so a
 * small limit still reads ordinary workbooks) and are checked while the parts are unpacked and parsed.
 * Sheets are streamed, so they may be large; shared texts are held in memory while the sheet is
 * read, so their part is kept to a quarter of the upload limit.
 */
const workbookLimits = {
  /** Unpacked size of one sheet (or any part read). */
  partBytes: Math.max(16 * MB, 4 * uploadMaxBytes),
  /** Unpacked size of all parts together, as the archive states them and as they are read. */
  totalBytes: Math.max(32 * MB, 8 * uploadMaxBytes),
  /** Unpacked size of the shared texts (xl/sharedStrings.xml). */
  sharedStringsBytes: Math.max(4 * MB, Math.round(uploadMaxBytes / 4)),
  /** Distinct shared texts. */
  sharedStrings: Math.max(50_000, Math.round(config.UPLOAD_MAX_MB * 4_000)),
  /** Files in the archive (an ordinary workbook has a dozen or so). */
  entries: 10_000,
  /**
   * Most a part may unpack to per packed byte, once it is larger than ratioFloorBytes. Sheets
   * written by spreadsheet programs unpack to about 10 times their packed size, even when every
   * row holds the same values; a part that unpacks hundreds of times over is padding.
   */
  maxRatio: 100,
  ratioFloorBytes: 8 * MB,
}

export const ingestConfig = {
  /** Uploads in transfer: a folder per server process inside (see uploads/temp-files). */
  uploadsRoot: join(dataDir, 'uploads'),
  uploadMaxBytes,
  uploadMaxMb: config.UPLOAD_MAX_MB,
  maxColumns: settings.INGEST_MAX_COLUMNS,
  maxFieldChars: settings.INGEST_MAX_FIELD_CHARS,
  naValues: [
    '',
    ...settings.INGEST_NA_VALUES.split(',')
      .map((v) => v.trim())
      .filter(Boolean),
  ],
  /** Distinct values counted per column; beyond this a column is reported as "more than" and not offered as a level. */
  distinctCap: 65_000,
  /** Longest column name accepted. */
  maxNameChars: 200,
  workbook: workbookLimits,
} as const

export type WorkbookLimits = typeof workbookLimits

export type IngestConfig = typeof ingestConfig
