import type { Factor } from '../../shared/stats/types'

/**
 * The cells of a two-factor design as one factor: name "A:B", labels "a:b" in order of first
 * appearance, the same naming the result uses for its groups. For callers that compare design
 * cells as plain groups (agreement between labs), never for the model itself.
 *
 * @example
 * crossFactors(genotype, treatment).labels // → ['WT:vehicle', 'WT:NW-117', 'KO:vehicle', 'KO:NW-117']
 */
export function crossFactors(first: Factor, second: Factor): Factor {
  const n = first.codes.length
  if (second.codes.length !== n) throw new Error('crossFactors: the two factors differ in length')
  const codes = new Int32Array(n)
  const labels: string[] = []
  const codeOfPair = new Map<number, number>()
  const width = second.labels.length
  for (let i = 0; i < n; i++) {
    const a = first.codes[i]
    const b = second.codes[i]
    if (a < 0 || b < 0) {
      codes[i] = -1
      continue
    }
    const pair = a * width + b
    let code = codeOfPair.get(pair)
    if (code === undefined) {
      code = labels.length
      labels.push(`${first.labels[a]}:${second.labels[b]}`)
      codeOfPair.set(pair, code)
    }
    codes[i] = code
  }
  return { name: `${first.name}:${second.name}`, codes, labels }
}

/**
 * The one comparison group a design's reference stands for: the reference level of each factor
 * (its first label when none is set), joined as crossFactors names the cells.
 */
export function referenceCell(factors: readonly Factor[], reference: Record<string, string>): string | null {
  if (!factors.length) return null
  return factors.map((f) => reference[f.name] ?? f.labels[0]).join(':')
}
