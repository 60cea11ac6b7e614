import { join, resolve } from 'node:path'
import { z } from 'zod'
import { config } from '../config'

// Ingest settings beyond server/config.ts, read from the same environment (defaults shown in docs/api-datasets.md).
const IngestSettings = z.object({
  DATA_DIR: z.string().default('.data'),
  /** Where original uploads are kept, content-addressed by SHA-256; one folder per database. */
  ORIGINALS_DIR: z.string().optional(),
  INGEST_MAX_COLUMNS: z.coerce.number().int().min(2).max(1500).default(500),
  INGEST_MAX_FIELD_CHARS: z.coerce.number().int().min(100).default(10_000),
  /** Comma-separated words read as "missing" besides an empty cell. */
  INGEST_NA_VALUES: z.string().default('NA,N/A,n/a,na,NaN,nan,NULL,null,#N/A,#NA,-'),
})

const settings = IngestSettings.parse(process.env)

const dataDir = resolve(settings.DATA_DIR)

export const ingestConfig = {
  uploadsDir: join(dataDir, 'uploads'),
  // Separate databases (development, tests, e2e, benchmarks) share the data folder but never each other's files.
  originalsDir: join(resolve(settings.ORIGINALS_DIR ?? join(dataDir, 'originals')), config.PGDATABASE),
  uploadMaxBytes: Math.round(config.UPLOAD_MAX_MB * 1024 * 1024),
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
} as const

export type IngestConfig = typeof ingestConfig
