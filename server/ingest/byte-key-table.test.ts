import seedrandom from 'seedrandom'
import { describe, expect, it } from 'vitest'
import { ByteKeyTable } from './byte-key-table'

describe('ByteKeyTable', () => {
  it('finds every key it was given, and no other, through growth and hash collisions', () => {
    // Checked against a Map of the same keys (common practice, no source).
    const random = seedrandom('byte-key-table')
    const table = new ByteKeyTable()
    const reference = new Map<string, number>()
    const bytes = Buffer.alloc(64)
    for (let k = 0; k < 20_000; k++) {
      const key = Math.floor(random() * 30_000).toString(36) + (random() < 0.1 ? 'µ' : '')
      const length = bytes.write(key, 8)
      const hash = ByteKeyTable.hash(bytes, 8, 8 + length)
      const entry = table.find(bytes, 8, 8 + length, hash)
      if (reference.has(key)) expect(table.value(entry)).toBe(reference.get(key))
      else {
        expect(entry).toBe(-1)
        reference.set(key, reference.size)
        table.insert(bytes, 8, 8 + length, hash, reference.size - 1)
      }
    }
    expect(table.size).toBe(reference.size)
    // The empty key and keys that differ only in length are kept apart.
    const empty = ByteKeyTable.hash(bytes, 0, 0)
    expect(table.find(bytes, 0, 0, empty)).toBe(-1)
    table.insert(bytes, 0, 0, empty, 7)
    expect(table.value(table.find(bytes, 3, 3, empty))).toBe(7)
  })
})
