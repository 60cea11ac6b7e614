import type { NestedColumns } from '../../shared/stats/types'
import type { RExportColumns } from './r-script'
import { quoteCsvField } from './units-csv'

/** Rows written per chunk: large enough to stream fast, small enough to stay out of memory. */
const ROWS_PER_CHUNK = 5000

/**
 * The exact rows an analysis used, for R: the columns of the model (response, trials, levels
 * outer first, conditions, covariates), one line per kept row (the version's recorded exclusions are applied by
 * the read-back; rows without a response or covariate value are left out, as the engine left them
 * out), in chunks so a million rows stream instead of filling memory.
 *
 * Labels are written exactly as stored (quoted per RFC 4180), not neutralised against spreadsheet
 * formulas as the unit table is: this file is for R, and R must see the labels the engine saw.
 * Numbers are written in their shortest round-trip form, which R reads back to the same double.
 * No byte-order mark: R's read.csv would take it into the first column's name.
 */
export function* rRowsCsvChunks(columns: NestedColumns, order: RExportColumns): Generator<string> {
  const factors = new Map([...columns.levels, ...(columns.factors ?? [])].map((f) => [f.name, f]))
  const numbers = new Map((columns.covariates ?? []).map((c) => [c.name, c.values]))
  const labelColumns = [...order.levels, ...order.conditions].map((name) => {
    const factor = factors.get(name)
    if (!factor) throw new Error(`rRowsCsvChunks: the rows have no column “${name}”`)
    return { codes: factor.codes, labels: factor.labels.map(quoteCsvField) }
  })
  const covariates = order.covariates.map((name) => {
    const values = numbers.get(name)
    if (!values) throw new Error(`rRowsCsvChunks: the rows have no covariate “${name}”`)
    return values
  })
  const trials = order.trials ? columns.trials : null
  if (order.trials && !trials) throw new Error(`rRowsCsvChunks: the rows have no trials “${order.trials}”`)
  const header = [order.response, ...(order.trials ? [order.trials] : [])]
  yield (
    [...header, ...order.levels, ...order.conditions, ...order.covariates].map(quoteCsvField).join(',') + '\n'
  )
  const y = columns.response
  let chunk: string[] = []
  for (let r = 0; r < y.length; r++) {
    if (!Number.isFinite(y[r]) || covariates.some((values) => !Number.isFinite(values[r]))) continue
    if (trials && !Number.isFinite(trials[r])) continue
    const cells = trials ? [String(y[r]), String(trials[r])] : [String(y[r])]
    for (const column of labelColumns) cells.push(column.labels[column.codes[r]])
    for (const values of covariates) cells.push(String(values[r]))
    chunk.push(cells.join(','))
    if (chunk.length === ROWS_PER_CHUNK) {
      yield chunk.join('\n') + '\n'
      chunk = []
    }
  }
  if (chunk.length) yield chunk.join('\n') + '\n'
}
