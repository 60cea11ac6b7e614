import { gzipSync } from 'node:zlib'
import type { Plugin } from 'vite'

interface ChunkLike {
  type: 'chunk' | 'asset'
  fileName: string
  isEntry?: boolean
  imports?: string[]
  code?: string
}

const kb = (bytes: number) => `${(bytes / 1024).toFixed(0)} KB`

/**
 * Prints after each client build how much JavaScript a first visit downloads: the entry chunk and
 * every chunk it imports statically (views loaded on demand come later), gzip-compressed as a
 * server would send them. The budget is 400 KB.
 */
export function firstLoadSize(): Plugin {
  return {
    name: 'nestwise-first-load-size',
    apply: 'build',
    generateBundle(_options, bundle) {
      const chunks = Object.values(bundle) as ChunkLike[]
      const byName = new Map(chunks.map((c) => [c.fileName, c]))
      const gzipped = (c: ChunkLike) => gzipSync(c.code ?? '').length
      const firstLoad = new Set<string>()
      const visit = (name: string) => {
        if (firstLoad.has(name)) return
        firstLoad.add(name)
        for (const imported of byName.get(name)?.imports ?? []) visit(imported)
      }
      for (const c of chunks) if (c.type === 'chunk' && c.isEntry) visit(c.fileName)
      const js = chunks.filter((c) => c.type === 'chunk')
      const first = [...firstLoad].reduce((sum, name) => sum + gzipped(byName.get(name)!), 0)
      const all = js.reduce((sum, c) => sum + gzipped(c), 0)
      console.log(
        `first-load JavaScript: ${kb(first)} gzip in ${firstLoad.size} file(s) (budget 400 KB); all JavaScript: ${kb(all)} gzip in ${js.length} files`,
      )
    },
  }
}
