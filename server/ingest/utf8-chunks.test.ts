import { describe, expect, it } from 'vitest'
import { Utf8Chunks } from './utf8-chunks'

describe('Utf8Chunks', () => {
  it('keeps characters cut at any chunk boundary whole', () => {
    const bytes = Buffer.from('µm;é;😀;a')
    for (let cut = 0; cut <= bytes.length; cut++) {
      const decoder = new Utf8Chunks()
      const parts = [decoder.write(bytes.subarray(0, cut)), decoder.write(bytes.subarray(cut)), decoder.end()]
      // Each part holds whole characters only, so each decodes on its own.
      expect(parts.map((part) => part?.toString('utf8') ?? 'X').join('')).toBe('µm;é;😀;a')
    }
  })

  it('reports Windows-1252 bytes and a file that ends inside a character', () => {
    expect(new Utf8Chunks().write(Buffer.from([0x61, 0xb5, 0x6d, 0x0a]))).toBeNull()
    const decoder = new Utf8Chunks()
    expect(decoder.write(Buffer.from([0x61, 0xc3]))?.toString()).toBe('a')
    expect(decoder.end()).toBeNull()
  })
})
