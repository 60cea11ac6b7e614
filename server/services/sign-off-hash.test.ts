import { createHash } from 'node:crypto'
import { describe, expect, it } from 'vitest'
import { signOffHash } from './sign-off-hash'

const content = {
  datasetSha256: 'a'.repeat(64),
  settings: { response: 'neurite_length_um', errorBar: 'sem' },
  engineVersion: '1.0.0',
  result: { nObs: 10, effectiveN: 4.2 },
}

// The recipe is ours; the expected digest is recomputed from its spelled-out text (common practice, no source).
describe('signOffHash', () => {
  it('hashes the tagged, newline-joined canonical parts', () => {
    const text = `nestwise-sign-off-v1\n${'a'.repeat(64)}\n{"errorBar":"sem","response":"neurite_length_um"}\n1.0.0\n{"effectiveN":4.2,"nObs":10}`
    expect(signOffHash(content)).toBe(createHash('sha256').update(text).digest('hex'))
  })

  it('does not depend on key order', () => {
    const reordered = { ...content, result: { effectiveN: 4.2, nObs: 10 } }
    expect(signOffHash(reordered)).toBe(signOffHash(content))
  })

  it('changes when any part changes', () => {
    const base = signOffHash(content)
    expect(signOffHash({ ...content, datasetSha256: 'b'.repeat(64) })).not.toBe(base)
    expect(signOffHash({ ...content, engineVersion: '1.0.1' })).not.toBe(base)
    expect(signOffHash({ ...content, settings: { ...content.settings, errorBar: 'sd' } })).not.toBe(base)
    expect(signOffHash({ ...content, result: { nObs: 10, effectiveN: 4.3 } })).not.toBe(base)
  })
})
