import { randomBytes } from 'node:crypto'
import { mkdirSync } from 'node:fs'
import { readdir, rm, stat } from 'node:fs/promises'
import { hostname } from 'node:os'
import { extname, join } from 'node:path'

/**
 * Where uploads are written while they arrive. Each server process has a folder of its own,
 * `<uploads>/<host>-<pid>`, so at start-up a process can tell the files of a process that is gone
 * (a crash leaves its temp files behind) from those of another process still receiving: folders of
 * this host whose process no longer runs are removed at once, the rest only once they are a day old
 * (another host sharing the folder, or a process id taken over by another program).
 */
export interface TempUploads {
  /** This process's folder (created on first use). */
  dir: string
  /** A fresh random path in it, keeping the file's extension (the original name is never a path). */
  pathFor(originalName: string): string
}

const DAY_MS = 24 * 60 * 60 * 1000
const OWN_FOLDER = /^(.+)-(\d+)$/

export function tempUploads(root: string, owner = `${hostname()}-${process.pid}`): TempUploads {
  const dir = join(root, owner)
  let made = false
  return {
    dir,
    pathFor(originalName) {
      if (!made) {
        mkdirSync(dir, { recursive: true })
        made = true
      }
      const ext = extname(originalName).toLowerCase().slice(0, 8)
      return join(dir, `${Date.now()}-${randomBytes(8).toString('hex')}${ext}`)
    },
  }
}

function processRuns(pid: number): boolean {
  try {
    process.kill(pid, 0)
    return true
  } catch (error) {
    return (error as NodeJS.ErrnoException).code === 'EPERM'
  }
}

async function age(path: string): Promise<number> {
  const info = await stat(path).catch(() => null)
  return info ? Date.now() - info.mtimeMs : 0
}

/**
 * Removes what crashed processes left under `root`; returns how many folders and loose files went.
 * Loose files (the layout before per-process folders) go once they are an hour old.
 */
export async function sweepTempUploads(
  root: string,
  self = `${hostname()}-${process.pid}`,
): Promise<{ folders: number; files: number }> {
  const names = await readdir(root).catch(() => [] as string[])
  const host = hostname()
  let folders = 0
  let files = 0
  for (const name of names) {
    if (name === self) continue
    const path = join(root, name)
    const info = await stat(path).catch(() => null)
    if (!info) continue
    if (info.isFile()) {
      if ((await age(path)) > 60 * 60 * 1000) {
        await rm(path, { force: true })
        files++
      }
      continue
    }
    const owner = OWN_FOLDER.exec(name)
    const gone = owner !== null && owner[1] === host && !processRuns(Number(owner[2]))
    if (gone || (await age(path)) > DAY_MS) {
      await rm(path, { recursive: true, force: true })
      folders++
    }
  }
  return { folders, files }
}
