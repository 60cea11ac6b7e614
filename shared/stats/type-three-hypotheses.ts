import { invertSpd } from './reml/small-cholesky'
import type { FixedLayout } from './types'

/**
 * The type III hypothesis of each fixed term (rows of L in Lβ = 0), built as lmerTest 3.1
 * builds them for a treatment-coded model (`extract_contrasts_type3`): write every column of
 * the overparameterised design (intercept, every label of each factor, every A × B cell, the
 * covariates) in the model's columns; then, interaction first, replace each term's columns by
 * their residuals after least squares on the columns of the terms that contain it (A and B are
 * contained in A:B); keep the rows that are model columns; each term's hypothesis is the
 * transpose of its columns, rounded to 7 significant digits as R's zapsmall does, zero rows
 * dropped. For a model with all cells observed these are the equal-weight (unweighted marginal
 * means) hypotheses of SAS's type III.
 *
 * Source: Kuznetsova, Brockhoff & Christensen (2017), J Stat Softw 82(13), §5; Goodnight (1980),
 * Am Stat 34:2; lmerTest 3.1-3 (extract_contrasts_type3, read from the Debian package).
 *
 * Guard errors: none.
 *
 * @example
 * typeThreeHypotheses(layoutOf('Variety * nitro'), [3, 4]).find((h) => h.term === 'Variety')!.rows
 * // → 2 rows over the 12 coefficients (Oats: lmerTest's anova(type = 3) uses the same)
 */
export function typeThreeHypotheses(
  layout: Pick<FixedLayout, 'columns' | 'terms'>,
  nLabels: number[],
): { term: string; rows: number[][] }[] {
  const p = layout.columns.length
  const factorTerms = layout.terms.slice(0, nLabels.length)
  const interaction = nLabels.length === 2 ? layout.terms[layout.terms.length - 1] : null
  const covariateTerms = layout.terms.filter((t) => !factorTerms.includes(t) && t !== interaction)

  // Each label of a factor as a combination of the intercept and the factor's dummies.
  const labelRows = factorTerms.map((term, f) =>
    Array.from({ length: nLabels[f] }, (_, k) => {
      const row = new Array<number>(p).fill(0)
      if (k === 0) {
        row[0] = 1
        for (const col of term.columns) row[col] = -1
      } else row[term.columns[k - 1]] = 1
      return row
    }),
  )
  // Rows of L: one per overparameterised column; `kept[i]` is the model column row i stands for (−1: none).
  const rows: number[][] = []
  const kept: number[] = []
  const unit = (col: number) => Array.from({ length: p }, (_, k) => (k === col ? 1 : 0))
  rows.push(unit(0))
  kept.push(0)
  labelRows.forEach((labels, f) =>
    labels.forEach((row, k) => {
      rows.push(row)
      kept.push(k === 0 ? -1 : factorTerms[f].columns[k - 1])
    }),
  )
  for (const term of covariateTerms) {
    rows.push(unit(term.columns[0]))
    kept.push(term.columns[0])
  }
  if (interaction) {
    const [kA, kB] = nLabels
    const dummy = (i: number, j: number) => interaction.columns[(j - 1) * (kA - 1) + (i - 1)]
    for (let j = 0; j < kB; j++) {
      for (let i = 0; i < kA; i++) {
        rows.push(productRow(labelRows[0][i], labelRows[1][j], factorTerms, dummy, p))
        kept.push(i > 0 && j > 0 ? dummy(i, j) : -1)
      }
    }
  }

  const L = rows.map((r) => [...r])
  if (interaction) {
    for (const term of factorTerms) residualise(L, term.columns, interaction.columns)
  }
  const zapped = zapsmall(L)
  const byColumn = new Map<number, number[]>()
  kept.forEach((col, i) => col >= 0 && byColumn.set(col, zapped[i]))
  return layout.terms.map((term) => ({
    term: term.term,
    rows: term.columns
      .map((c) => Array.from({ length: p }, (_, k) => byColumn.get(k)![c]))
      .filter((row) => row.reduce((s, v) => s + Math.abs(v), 0) > 1e-8),
  }))
}

/** The A label row times the B label row, as model columns (1·1 = 1, 1·A = A, A·B = A:B). */
function productRow(
  a: number[],
  b: number[],
  factorTerms: { columns: number[] }[],
  dummy: (i: number, j: number) => number,
  p: number,
): number[] {
  const row = new Array<number>(p).fill(0)
  const aParts: [number, number][] = [
    [0, a[0]],
    ...factorTerms[0].columns.map((c, i): [number, number] => [i + 1, a[c]]),
  ]
  const bParts: [number, number][] = [
    [0, b[0]],
    ...factorTerms[1].columns.map((c, j): [number, number] => [j + 1, b[c]]),
  ]
  for (const [i, va] of aParts) {
    if (va === 0) continue
    for (const [j, vb] of bParts) {
      if (vb === 0) continue
      const col =
        i === 0
          ? j === 0
            ? 0
            : factorTerms[1].columns[j - 1]
          : j === 0
            ? factorTerms[0].columns[i - 1]
            : dummy(i, j)
      row[col] += va * vb
    }
  }
  return row
}

/** Replaces the `target` columns of L by their least-squares residuals on the `on` columns (over L's rows). */
function residualise(L: number[][], target: number[], on: number[]): void {
  const q = on.length
  const gram = on.map((a) => on.map((b) => L.reduce((s, row) => s + row[a] * row[b], 0)))
  const inverse = invertSpd(gram)
  for (const col of target) {
    const xty = on.map((a) => L.reduce((s, row) => s + row[a] * row[col], 0))
    const coef = inverse.map((r) => r.reduce((s, v, k) => s + v * xty[k], 0))
    for (const row of L) {
      let fitted = 0
      for (let k = 0; k < q; k++) fitted += row[on[k]] * coef[k]
      row[col] -= fitted
    }
  }
}

/** R's zapsmall(x, digits = 7) over the whole matrix: round to 7 − ceil(log10(max |x|)) decimals. */
function zapsmall(L: number[][]): number[][] {
  const mx = Math.max(...L.flat().map(Math.abs))
  const digits = mx > 0 ? Math.max(0, 7 - Math.ceil(Math.log10(mx))) : 7
  const scale = 10 ** digits
  return L.map((row) => row.map((v) => Math.round(v * scale) / scale))
}
