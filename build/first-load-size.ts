import { gzipSync } from 'node:zlib'
import type { Plugin, Rollup } from 'vite'

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
      const js = Object.values(bundle).filter((c): c is Rollup.OutputChunk => c.type === 'chunk')
      // Each chunk compressed once, for both totals.
      const gzipped = new Map(js.map((c) => [c.fileName, gzipSync(c.code).length]))
      const imports = new Map(js.map((c) => [c.fileName, c.imports]))
      const firstLoad = new Set<string>()
      const visit = (name: string) => {
        if (firstLoad.has(name)) return
        firstLoad.add(name)
        for (const imported of imports.get(name) ?? []) visit(imported)
      }
      for (const c of js) if (c.isEntry) visit(c.fileName)
      const sum = (names: Iterable<string>) =>
        [...names].reduce((total, name) => total + gzipped.get(name)!, 0)
      console.log(
        `first-load JavaScript: ${kb(sum(firstLoad))} gzip in ${firstLoad.size} file(s) (budget 400 KB); all JavaScript: ${kb(sum(gzipped.keys()))} gzip in ${js.length} files`,
      )
    },
  }
}
