import { copyFile, mkdir, readdir, rename, rm, stat } from 'node:fs/promises'
import { join } from 'node:path'
import { ingestConfig } from './ingest-config'

/**
 * Original uploads, kept byte for byte under their SHA-256 so any analysis can be redone from the
 * exact file. Identical uploads share one file. Ingests in flight hold their hash, so a failed
 * upload never deletes a file that a concurrent upload of the same bytes is about to reference.
 */
const inFlight = new Map<string, number>()

export const originalPath = (sha256: string) => join(ingestConfig.originalsDir, sha256)

export function holdHash(sha256: string): () => void {
  inFlight.set(sha256, (inFlight.get(sha256) ?? 0) + 1)
  let released = false
  return () => {
    if (released) return
    released = true
    const left = (inFlight.get(sha256) ?? 1) - 1
    if (left <= 0) inFlight.delete(sha256)
    else inFlight.set(sha256, left)
  }
}

const exists = (path: string) =>
  stat(path).then(
    () => true,
    () => false,
  )

/** Moves the uploaded temp file into the store; returns true when this call created the stored file. */
export async function keepOriginal(tempPath: string, sha256: string): Promise<boolean> {
  await mkdir(ingestConfig.originalsDir, { recursive: true })
  const target = originalPath(sha256)
  if (await exists(target)) return false
  try {
    await rename(tempPath, target)
  } catch (error) {
    // The store may sit on another disk than the upload folder.
    if ((error as NodeJS.ErrnoException).code !== 'EXDEV') throw error
    await copyFile(tempPath, `${target}.partial`)
    await rename(`${target}.partial`, target)
  }
  return true
}

/** Deletes a stored original unless an ingest in flight holds it; the caller has checked no version refers to it. */
export async function discardOriginal(sha256: string): Promise<void> {
  if (inFlight.has(sha256)) return
  await rm(originalPath(sha256), { force: true })
}

/** Files in `dir` last changed before `olderThanMs` ago. */
export async function staleFiles(dir: string, olderThanMs: number): Promise<string[]> {
  const names = await readdir(dir).catch(() => [] as string[])
  const cutoff = Date.now() - olderThanMs
  const out: string[] = []
  for (const name of names) {
    const info = await stat(join(dir, name)).catch(() => null)
    if (info?.isFile() && info.mtimeMs < cutoff) out.push(name)
  }
  return out
}
