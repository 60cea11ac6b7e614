import { logger } from '../logger'
import { diskStore } from './disk-store'
import { startFakeS3, type RunningFakeS3 } from './fake-s3-server'
import type { OriginalStore } from './original-store'
import { FAKE_S3_CREDENTIALS, originalsConfig } from './originals-config'
import { s3Store } from './s3-store'

export type { OriginalStore } from './original-store'

let store: OriginalStore | null = null

function configuredStore(): OriginalStore {
  if (originalsConfig.store === 'disk') return diskStore(originalsConfig.diskDir)
  const { s3, fake } = originalsConfig
  if (!fake.wanted) return s3Store(s3)
  return s3Store({
    ...s3,
    endpoint: `http://127.0.0.1:${fake.port}`,
    forcePathStyle: true,
    credentials: FAKE_S3_CREDENTIALS,
  })
}

/** This process's store of originals (ORIGINALS_STORE). */
export function originalStore(): OriginalStore {
  store ??= configuredStore()
  return store
}

/** Replaces the store (tests that run the app against an S3 fake of their own); null goes back to the configured one. */
export function useOriginalStore(replacement: OriginalStore | null): void {
  store = replacement
}

export interface OriginalsRuntime {
  stop(): Promise<void>
}

/**
 * What a web process runs for originals: with ORIGINALS_STORE=s3 and no S3_ENDPOINT outside
 * production, the local fake S3 on 127.0.0.1:S3_FAKE_PORT. Several processes of one development
 * set-up share it: when the port is taken, the fake of a sibling process is assumed to serve it.
 */
export async function startOriginalsRuntime(): Promise<OriginalsRuntime> {
  const { fake, s3 } = originalsConfig
  let running: RunningFakeS3 | undefined
  if (fake.wanted) {
    try {
      running = await startFakeS3({ port: fake.port, dir: fake.dir, bucket: s3.bucket })
      logger.info(`local fake S3 on ${running.endpoint} (bucket ${s3.bucket}, files in ${fake.dir})`)
    } catch (err) {
      if ((err as NodeJS.ErrnoException).code !== 'EADDRINUSE') throw err
      logger.info(`S3 fake port ${fake.port} is taken; using the fake already serving it`)
    }
  }
  return { stop: async () => running?.close() }
}
