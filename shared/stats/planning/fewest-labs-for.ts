/** Beyond this many labs the search gives up and says so (null). */
export const FEWEST_LABS_LIMIT = 10_000

/** Fewest labs (from `first`) whose ceiling reaches the goal: doubling, then bisection; null past 10 000. */
export function fewestLabsFor(
  ceilingOf: (labs: number) => number,
  first: number,
  goal: number,
): number | null {
  if (ceilingOf(first) >= goal) return first
  let low = first
  let high = Math.max(first + 1, first * 2)
  while (ceilingOf(high) < goal) {
    low = high
    high *= 2
    if (high > FEWEST_LABS_LIMIT)
      return ceilingOf(FEWEST_LABS_LIMIT) >= goal ? bisect(low, FEWEST_LABS_LIMIT) : null
  }
  return bisect(low, high)

  function bisect(below: number, atLeast: number): number {
    while (atLeast - below > 1) {
      const mid = Math.floor((below + atLeast) / 2)
      if (ceilingOf(mid) >= goal) atLeast = mid
      else below = mid
    }
    return atLeast
  }
}
