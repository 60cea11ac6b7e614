import { describe, expect, it } from 'vitest'
import { countPaths, extendPaths, reusedLabelCount, reusedLabels, type CodedColumn } from './unit-paths'

const column = (name: string, codes: number[], labelCount: number): CodedColumn => ({
  name,
  codes: Int32Array.from(codes),
  labels: Array.from({ length: labelCount }, (_, k) => `${name}${k}`),
})

describe('unit paths', () => {
  it('keys units by their full path and numbers them in order of appearance', () => {
    // lab: A A B B B, animal: m1 m2 m1 m1 missing → A·m1, A·m2, B·m1 (example worked by hand)
    const lab = extendPaths(null, column('lab', [0, 0, 1, 1, 1], 2), 5)
    const animal = extendPaths(lab, column('m', [0, 1, 0, 0, -1], 2), 5)
    expect(Array.from(animal.ids)).toEqual([0, 1, 2, 2, -1])
    expect(animal.count).toBe(3)
    expect(Array.from(animal.parent)).toEqual([0, 0, 1])
    expect(reusedLabels(animal)).toEqual(['m0'])
    expect(countPaths(lab, animal.column, 5)).toBe(3)
  })

  it('lists the first five reused labels and counts them all', () => {
    // Invented: two labs, eight mice each under the same labels m0…m7: all eight are reused.
    const lab = extendPaths(null, column('lab', [...Array(8).fill(0), ...Array(8).fill(1)], 2), 16)
    const mouse = extendPaths(lab, column('m', [0, 1, 2, 3, 4, 5, 6, 7, 0, 1, 2, 3, 4, 5, 6, 7], 8), 16)
    expect(reusedLabels(mouse)).toEqual(['m0', 'm1', 'm2', 'm3', 'm4'])
    expect(reusedLabelCount(mouse)).toBe(8)
  })

  it('counts the same units with the flat table and with the map used for huge label products', () => {
    const rows = 6000
    const parentCodes = Array.from({ length: rows }, (_, r) => r % 3000)
    const childCodes = Array.from({ length: rows }, (_, r) => (r * 7) % 2000)
    const parent = extendPaths(null, column('p', parentCodes, 3000), rows)
    // 3000 × 2000 label slots exceed the flat table's limit, so both functions take the map path.
    const child = extendPaths(parent, column('c', childCodes, 2000), rows)
    const distinct = new Set(parentCodes.map((p, r) => `${p}/${childCodes[r]}`)).size
    expect(child.count).toBe(distinct)
    expect(countPaths(parent, child.column, rows)).toBe(distinct)
  })
})
