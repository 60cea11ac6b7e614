import type { Readable } from 'node:stream'

/**
 * Original uploads, kept byte for byte under their SHA-256 so any analysis can be redone from the
 * exact file; identical uploads share one copy. Two stores implement this: a folder on disk
 * (disk-store.ts) and an S3 bucket (s3-store.ts).
 */
export interface OriginalStore {
  readonly kind: 'disk' | 's3'
  /**
   * Takes the finished upload at `tempPath` into the store under `sha256` (the temp file is gone
   * afterwards). A copy already there is marked fresh, so the start-up sweep of unreferenced
   * originals (an hour old at least) never removes it while the upload that refers to it commits.
   */
  keep(tempPath: string, sha256: string): Promise<void>
  /** A stream of the stored bytes and their length; null when the store has no such original. */
  open(sha256: string): Promise<{ stream: Readable; size: number } | null>
  exists(sha256: string): Promise<boolean>
  discard(sha256: string): Promise<void>
  /** Hashes of originals last written before `olderThanMs` ago (for the sweep). */
  staleHashes(olderThanMs: number): Promise<string[]>
}

export const SHA256_NAME = /^[0-9a-f]{64}$/
