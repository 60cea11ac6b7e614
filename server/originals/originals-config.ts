import { join, resolve } from 'node:path'
import { z } from 'zod'
import { config } from '../config'

/**
 * Where original uploads are kept (read from the same environment as server/config.ts):
 * `disk` (default) a folder on this machine; `s3` a bucket of any S3-compatible store, through the
 * AWS SDK. Outside production, `s3` without S3_ENDPOINT runs the local fake (s3rver) on loopback.
 */
const OriginalsSettings = z.object({
  ORIGINALS_STORE: z.enum(['disk', 's3']).default('disk'),
  DATA_DIR: z.string().default('.data'),
  /** Disk store: where originals are kept; one folder per database inside. */
  ORIGINALS_DIR: z.string().optional(),
  S3_ENDPOINT: z.string().url().optional(),
  S3_BUCKET: z.string().min(3).default('nestwise-originals'),
  S3_REGION: z.string().default('us-east-1'),
  S3_ACCESS_KEY_ID: z.string().optional(),
  S3_SECRET_ACCESS_KEY: z.string().optional(),
  /** Bucket in the path (https://host/bucket/key), as most S3-compatible stores and the fake need. */
  S3_FORCE_PATH_STYLE: z
    .enum(['true', 'false'])
    .default('true')
    .transform((v) => v === 'true'),
  /** Keys start with this; defaults to the database name and a slash, as the disk store's folders. */
  S3_PREFIX: z.string().optional(),
  /** The local fake: port on 127.0.0.1 and folder. */
  S3_FAKE_PORT: z.coerce.number().int().min(0).max(65535).default(4569),
  S3_FAKE_DIR: z.string().optional(),
})

const settings = OriginalsSettings.parse(process.env)
const dataDir = resolve(settings.DATA_DIR)

export const FAKE_S3_CREDENTIALS = { accessKeyId: 'S3RVER', secretAccessKey: 'S3RVER' }

export const originalsConfig = {
  store: settings.ORIGINALS_STORE,
  // Separate databases (development, tests, e2e, benchmarks) share the data folder but never each other's files.
  diskDir: join(resolve(settings.ORIGINALS_DIR ?? join(dataDir, 'originals')), config.PGDATABASE),
  s3: {
    endpoint: settings.S3_ENDPOINT,
    bucket: settings.S3_BUCKET,
    region: settings.S3_REGION,
    forcePathStyle: settings.S3_FORCE_PATH_STYLE,
    prefix: settings.S3_PREFIX ?? `${config.PGDATABASE}/`,
    credentials:
      settings.S3_ACCESS_KEY_ID && settings.S3_SECRET_ACCESS_KEY
        ? { accessKeyId: settings.S3_ACCESS_KEY_ID, secretAccessKey: settings.S3_SECRET_ACCESS_KEY }
        : undefined,
  },
  fake: {
    /** The fake runs when the store is s3, no endpoint is given, and this is not production. */
    wanted: settings.ORIGINALS_STORE === 's3' && !settings.S3_ENDPOINT && config.NODE_ENV !== 'production',
    port: settings.S3_FAKE_PORT,
    dir: resolve(settings.S3_FAKE_DIR ?? join(dataDir, 's3')),
  },
}

export type S3Settings = typeof originalsConfig.s3
