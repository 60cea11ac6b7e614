/**
 * A hash table from byte strings to small integers, looked up straight from a range of a buffer.
 *
 * The column profiler asks it once per cell: a Map<string, number> would need a fresh string (and
 * its hash) for every cell of a million-row file, which cost more than all the rest of ingest.
 * Open addressing with linear probing; keys are copied into one growing arena.
 */
export class ByteKeyTable {
  private arena = new Uint8Array(4096)
  private arenaUsed = 0
  private keyStart = new Int32Array(64)
  private keyEnd = new Int32Array(64)
  private keyHash = new Int32Array(64)
  private values = new Int32Array(64)
  /** Entry index + 1 per slot; 0 marks an empty slot. */
  private slots = new Int32Array(128)
  size = 0

  /** FNV-1a over `bytes[start, end)`. */
  static hash(bytes: Uint8Array, start: number, end: number): number {
    let h = 0x811c9dc5
    for (let i = start; i < end; i++) h = Math.imul(h ^ bytes[i], 0x01000193)
    // As a signed 32-bit integer, the form keyHash stores (the empty key skips the loop above).
    return h | 0
  }

  /** The entry holding these bytes, or -1. */
  find(bytes: Uint8Array, start: number, end: number, hash: number): number {
    const mask = this.slots.length - 1
    for (let slot = hash & mask; ; slot = (slot + 1) & mask) {
      const entry = this.slots[slot] - 1
      if (entry < 0) return -1
      if (this.keyHash[entry] === hash && this.equals(entry, bytes, start, end)) return entry
    }
  }

  /** Whether entry `entry` holds exactly `bytes[start, end)`. */
  equals(entry: number, bytes: Uint8Array, start: number, end: number): boolean {
    const from = this.keyStart[entry]
    const length = end - start
    if (this.keyEnd[entry] - from !== length) return false
    const arena = this.arena
    for (let k = 0; k < length; k++) if (arena[from + k] !== bytes[start + k]) return false
    return true
  }

  value(entry: number): number {
    return this.values[entry]
  }

  /** Adds a key that find() did not find; returns its entry. */
  insert(bytes: Uint8Array, start: number, end: number, hash: number, value: number): number {
    const entry = this.size++
    if (entry === this.values.length) this.growEntries()
    const length = end - start
    if (this.arenaUsed + length > this.arena.length) {
      const bigger = new Uint8Array(Math.max(2 * this.arena.length, this.arenaUsed + length))
      bigger.set(this.arena.subarray(0, this.arenaUsed))
      this.arena = bigger
    }
    this.arena.set(bytes.subarray(start, end), this.arenaUsed)
    this.keyStart[entry] = this.arenaUsed
    this.keyEnd[entry] = this.arenaUsed + length
    this.arenaUsed += length
    this.keyHash[entry] = hash
    this.values[entry] = value
    // Kept at most half full, so probes stay short.
    if (2 * this.size > this.slots.length) this.rehash(2 * this.slots.length)
    else this.place(entry)
    return entry
  }

  private place(entry: number): void {
    const mask = this.slots.length - 1
    let slot = this.keyHash[entry] & mask
    while (this.slots[slot] !== 0) slot = (slot + 1) & mask
    this.slots[slot] = entry + 1
  }

  private rehash(slotCount: number): void {
    this.slots = new Int32Array(slotCount)
    for (let entry = 0; entry < this.size; entry++) this.place(entry)
  }

  private growEntries(): void {
    const grow = (from: Int32Array) => {
      const to = new Int32Array(2 * from.length)
      to.set(from)
      return to
    }
    this.keyStart = grow(this.keyStart)
    this.keyEnd = grow(this.keyEnd)
    this.keyHash = grow(this.keyHash)
    this.values = grow(this.values)
  }
}
