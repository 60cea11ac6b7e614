import { describe, expect, it } from 'vitest'
import { Utf8Chunks } from './utf8-chunks'

describe('Utf8Chunks', () => {
  it('decodes characters cut at any chunk boundary', () => {
    const bytes = Buffer.from('µm;é;😀;a')
    for (let cut = 0; cut <= bytes.length; cut++) {
      const decoder = new Utf8Chunks()
      const text =
        (decoder.write(bytes.subarray(0, cut)) ?? 'X') +
        (decoder.write(bytes.subarray(cut)) ?? 'X') +
        (decoder.end() ?? 'X')
      expect(text).toBe('µm;é;😀;a')
    }
  })

  it('reports Windows-1252 bytes and a file that ends inside a character', () => {
    expect(new Utf8Chunks().write(Buffer.from([0x61, 0xb5, 0x6d, 0x0a]))).toBeNull()
    const decoder = new Utf8Chunks()
    expect(decoder.write(Buffer.from([0x61, 0xc3]))).toBe('a')
    expect(decoder.end()).toBeNull()
  })
})
