/**
 * The type I (sequential) hypothesis of each fixed term, as lmerTest 3.1 builds it
 * (`get_contrasts_type1`) and uses for anova() of a model with a single term: factor XᵀX = L U
 * (Doolittle, L unit lower triangular); the hypothesis of a term is the rows of Lᵀ belonging to
 * its columns. For one term the F value does not depend on this choice of rows; lmerTest's
 * Satterthwaite denominator df does slightly, hence the exact recipe.
 *
 * Source: Kuznetsova, Brockhoff & Christensen (2017), J Stat Softw 82(13), §5; Goodnight (1980),
 * Am Stat 34:2; lmerTest 3.1-3 (get_contrasts_type1, doolittle).
 *
 * Guard errors: none.
 *
 * @example
 * typeOneHypotheses([[54, 18, 18], [18, 18, 0], [18, 0, 18]], [{ term: 'Machine', columns: [1, 2] }])
 * // → [{ term: 'Machine', rows: [[0, 1, -0.5], [0, 0, 1]] }]   (lmerTest, Machines)
 */
export function typeOneHypotheses(
  xtx: number[][],
  terms: { term: string; columns: number[] }[],
): { term: string; rows: number[][] }[] {
  const n = xtx.length
  const a = xtx.map((row) => [...row])
  const L: number[][] = a.map((_, i) => a.map((__, j) => (i === j ? 1 : 0)))
  for (let c = 0; c < n; c++) {
    for (let r = c + 1; r < n; r++) {
      const f = Math.abs(a[c][c]) < 1e-6 ? 0 : a[r][c] / a[c][c]
      L[r][c] = f
      for (let j = c; j < n; j++) a[r][j] -= f * a[c][j]
    }
  }
  for (const row of L) for (let j = 0; j < n; j++) if (Math.abs(row[j]) < 1e-6) row[j] = 0
  return terms.map(({ term, columns }) => ({
    term,
    rows: columns.map((c) => Array.from({ length: n }, (_, k) => L[k][c])),
  }))
}
