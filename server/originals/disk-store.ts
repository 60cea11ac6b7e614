import { createReadStream } from 'node:fs'
import { copyFile, mkdir, readdir, rename, rm, stat, utimes } from 'node:fs/promises'
import { join } from 'node:path'
import { SHA256_NAME, type OriginalStore } from './original-store'

/** Originals as files named by their SHA-256 in one folder (ORIGINALS_DIR/<database>). */
export function diskStore(dir: string): OriginalStore {
  const pathOf = (sha256: string) => join(dir, sha256)
  const info = (path: string) => stat(path).catch(() => null)
  return {
    kind: 'disk',
    async keep(tempPath, sha256) {
      await mkdir(dir, { recursive: true })
      const target = pathOf(sha256)
      if (await info(target)) {
        const now = new Date()
        await utimes(target, now, now)
        await rm(tempPath, { force: true })
        return
      }
      try {
        await rename(tempPath, target)
      } catch (error) {
        // The store may sit on another disk than the upload folder.
        if ((error as NodeJS.ErrnoException).code !== 'EXDEV') throw error
        await copyFile(tempPath, `${target}.partial`)
        await rename(`${target}.partial`, target)
        await rm(tempPath, { force: true })
      }
    },
    async open(sha256) {
      const found = await info(pathOf(sha256))
      if (!found?.isFile()) return null
      return { stream: createReadStream(pathOf(sha256)), size: found.size }
    },
    async exists(sha256) {
      return (await info(pathOf(sha256)))?.isFile() ?? false
    },
    async discard(sha256) {
      await rm(pathOf(sha256), { force: true })
    },
    async staleHashes(olderThanMs) {
      const names = await readdir(dir).catch(() => [] as string[])
      const cutoff = Date.now() - olderThanMs
      const out: string[] = []
      for (const name of names.filter((n) => SHA256_NAME.test(n))) {
        const found = await info(pathOf(name))
        if (found?.isFile() && found.mtimeMs < cutoff) out.push(name)
      }
      return out
    },
  }
}
