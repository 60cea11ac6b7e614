import { describe, expect, it } from 'vitest'
import type { Factor } from '../../shared/stats/types'
import { crossFactors, referenceCell } from './design-cells'

const factor = (name: string, labels: string[], codes: number[]): Factor => ({
  name,
  labels,
  codes: Int32Array.from(codes),
})

describe('crossFactors', () => {
  // Expected cells written out by hand from the rows below (common practice, no source).
  const genotype = factor('genotype', ['WT', 'KO'], [0, 0, 1, 1, 0, -1])
  const treatment = factor('treatment', ['vehicle', 'NW-117'], [0, 1, 0, 1, 1, 0])

  it('names each cell "a:b" in order of first appearance and codes every row', () => {
    const cells = crossFactors(genotype, treatment)
    expect(cells.name).toBe('genotype:treatment')
    expect(cells.labels).toEqual(['WT:vehicle', 'WT:NW-117', 'KO:vehicle', 'KO:NW-117'])
    expect(Array.from(cells.codes)).toEqual([0, 1, 2, 3, 1, -1])
  })

  it('refuses factors of different lengths', () => {
    expect(() => crossFactors(genotype, factor('t', ['a'], [0]))).toThrow(/differ in length/)
  })
})

describe('referenceCell', () => {
  const genotype = factor('genotype', ['WT', 'KO'], [0, 1])
  const treatment = factor('treatment', ['vehicle', 'NW-117'], [0, 1])

  it('joins the reference of each factor, defaulting to its first label', () => {
    expect(referenceCell([genotype, treatment], { treatment: 'NW-117' })).toBe('WT:NW-117')
    expect(referenceCell([genotype], {})).toBe('WT')
    expect(referenceCell([], {})).toBeNull()
  })
})
