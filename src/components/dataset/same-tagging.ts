interface TaggingShape {
  responseColumns: readonly string[]
  conditionColumn: string | null
  levels: readonly string[]
}

const sameList = (a: readonly string[], b: readonly string[]) =>
  a.length === b.length && a.every((x, k) => x === b[k])

/** Same roles for the same columns; level order matters, response order does not. */
export function sameTagging(a: TaggingShape, b: TaggingShape): boolean {
  return (
    sameList([...a.responseColumns].sort(), [...b.responseColumns].sort()) &&
    a.conditionColumn === b.conditionColumn &&
    sameList(a.levels, b.levels)
  )
}
