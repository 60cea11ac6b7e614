import type { DesignCells, FactorCoding, RandomLevel, RandomTerm, SkippedTerm } from '../types'

/** Factor sets a level can be crossed with, in the order their terms are listed: A, B, A:B. */
function factorSets(nFactors: number): number[][] {
  if (nFactors === 0) return []
  if (nFactors === 1) return [[0]]
  return [[0], [1], [0, 1]]
}

/**
 * The random intercepts of the maximal nested model (Barr, Levy, Scheepers & Tily 2013, "keep it
 * maximal"): every given level, and for every level within whose units a factor (or the two
 * factors' combination) varies, the level × factor intercept. A level × factor term is left out
 * when its groups are exactly those of another term: the observations themselves (one
 * observation per group, it would be the residual), the units of the next level down (or that
 * level's own × factor term), or an earlier term of the same level (two factors that group the
 * units' rows alike).
 *
 * Group counts decide sameness: the groups of one term refine those of the other in each case
 * compared, so equal counts mean equal groupings.
 */
export function maximalRandomTerms(
  levels: RandomLevel[],
  factors: FactorCoding[],
  cells: DesignCells,
  nObs: number,
): { terms: RandomTerm[]; skipped: SkippedTerm[] } {
  const sets = factorSets(factors.length)
  // groups[l][s]: distinct (unit of level l, labels of factor set s) among the observations.
  const groups = levels.map((level) => sets.map((set) => countGroups(level, set, cells)))
  const varies = (l: number, f: number) => {
    const s = sets.findIndex((set) => set.length === 1 && set[0] === f)
    return groups[l][s] > levels[l].nUnits
  }
  const terms: RandomTerm[] = []
  const skipped: SkippedTerm[] = []
  const path = (l: number) => levels.slice(0, l + 1).map((level) => level.name)
  const factorName = (set: number[]) => set.map((f) => factors[f].name).join(':')

  levels.forEach((level, l) => {
    terms.push({ name: level.name, grouping: path(l), level: l, factors: [], nGroups: level.nUnits })
    const kept: { set: number[]; n: number; name: string }[] = []
    sets.forEach((set, s) => {
      const n = groups[l][s]
      if (n <= level.nUnits) return // the set does not vary within this level's units
      const name = `${level.name}:${factorName(set)}`
      const sameAs = sameGrouping(l, set, n)
      if (sameAs) {
        skipped.push({ name, sameAs })
        return
      }
      kept.push({ set, n, name })
      terms.push({
        name,
        grouping: [...path(l), ...set.map((f) => factors[f].name)],
        level: l,
        factors: set,
        nGroups: n,
      })
    })

    function sameGrouping(l: number, set: number[], n: number): string | null {
      if (n >= nObs) return 'the observations (the residual)'
      // A:B refines A and B: equal counts mean the same groups. B and A are the same grouping
      // only when both equal their common refinement A:B.
      for (const k of kept) {
        const refines = set.length === 2 || (k.set.length === 1 && groups[l][2] === n)
        if (k.n === n && refines) return k.name
      }
      if (l + 1 < levels.length) {
        const inner = set.filter((f) => varies(l + 1, f))
        if (inner.length === 0) return n === levels[l + 1].nUnits ? levels[l + 1].name : null
        const s = sets.findIndex(
          (other) => other.length === inner.length && other.every((f, i) => f === inner[i]),
        )
        if (groups[l + 1][s] === n) return `${levels[l + 1].name}:${factorName(inner)}`
      }
      return null
    }
  })
  return { terms, skipped }
}

/** Distinct (unit, labels of the factors in `set`) pairs among the observations. */
function countGroups(level: RandomLevel, set: number[], cells: DesignCells): number {
  const nCells = cells.labels.length
  // Project each design cell onto the set's factors.
  const projection = new Int32Array(nCells)
  const seen = new Map<string, number>()
  for (let c = 0; c < nCells; c++) {
    const key = set.map((f) => cells.levelsOf[c][f]).join(',')
    if (!seen.has(key)) seen.set(key, seen.size)
    projection[c] = seen.get(key)!
  }
  const width = seen.size
  const mark = new Uint8Array(level.nUnits * width)
  let n = 0
  const units = level.unitOfObs
  const codes = cells.codes
  for (let i = 0; i < units.length; i++) {
    const slot = units[i] * width + projection[codes[i]]
    if (mark[slot] === 0) {
      mark[slot] = 1
      n++
    }
  }
  return n
}
