import { readdirSync, readFileSync } from 'node:fs'
import { describe, expect, it } from 'vitest'

/** The index is the library's table of contents: every public file of shared/stats is listed in it (common practice, no source). */
describe('the statistics index', () => {
  it('lists every public function file', () => {
    const index = readFileSync(new URL('./index.ts', import.meta.url), 'utf8')
    const listed = new Set([...index.matchAll(/from '\.\/([a-z0-9-]+)'/g)].map((m) => m[1]))
    const files = readdirSync(new URL('.', import.meta.url))
      .filter((f) => f.endsWith('.ts') && !f.endsWith('.test.ts'))
      .map((f) => f.slice(0, -3))
      .filter((f) => f !== 'index' && f !== 'types')
    expect(files.filter((f) => !listed.has(f))).toEqual([])
  })
})
