import type { CovariateColumn, DesignCells, FactorCoding, FixedLayout } from '../types'

/**
 * The fixed part `A * B + covariates` in treatment coding, columns in the order R's
 * model.matrix gives them (terms by degree: intercept, A, B, covariates, then A:B), so the
 * coefficients read as in lme4.
 */
export function fixedLayout(
  factors: FactorCoding[],
  covariates: CovariateColumn[],
  cells: DesignCells,
): FixedLayout {
  const columns: FixedLayout['columns'] = [{ term: '(intercept)', level: null }]
  const terms: FixedLayout['terms'] = []
  const dummyColumn: number[][] = factors.map((f) => {
    const at = f.labels.slice(1).map((label) => columns.push({ term: f.name, level: label }) - 1)
    terms.push({ term: f.name, columns: at })
    return [-1, ...at]
  })
  const covariateColumns = covariates.map((c) => {
    const at = columns.push({ term: c.name, level: null }) - 1
    terms.push({ term: c.name, columns: [at] })
    return at
  })
  const interaction: number[][] = []
  if (factors.length === 2) {
    const [a, b] = factors
    const term = `${a.name}:${b.name}`
    const at: number[] = []
    for (let i = 1; i < a.labels.length; i++) interaction[i] = []
    // R's order: the first factor varies fastest.
    for (let j = 1; j < b.labels.length; j++) {
      for (let i = 1; i < a.labels.length; i++) {
        interaction[i][j] = columns.push({ term, level: `${a.labels[i]}:${b.labels[j]}` }) - 1
        at.push(interaction[i][j])
      }
    }
    terms.push({ term, columns: at })
  }

  const p = columns.length
  const nCells = cells.labels.length
  const cellRows = new Float64Array(nCells * p)
  for (let c = 0; c < nCells; c++) {
    const row = c * p
    cellRows[row] = 1
    const codes = cells.levelsOf[c]
    codes.forEach((code, f) => {
      if (code > 0) cellRows[row + dummyColumn[f][code]] = 1
    })
    if (factors.length === 2 && codes[0] > 0 && codes[1] > 0)
      cellRows[row + interaction[codes[0]][codes[1]]] = 1
  }
  return { columns, terms, cellRows, covariateColumns }
}
