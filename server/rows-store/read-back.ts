import type { Readable } from 'node:stream'
import type { ColumnProfile, Exclusion } from '../../shared/schemas/datasets'
import { readBinaryResponse, type BinaryProblem } from '../../shared/analysis/binary-response'
import type { Factor, NestedColumns } from '../../shared/stats/types'
import { NotFoundError, UnprocessableError } from '../errors/app-error'
import { CopyTextLines, decodeCopyTextField, fieldEnd } from './copy-text'
import { parseNumberText, trimCell } from './number-text'
import { activeExclusions } from '../repositories/datasets-annotations.repo'
import { excludedSql, readBackSelect, type RowTableShape } from './row-queries'
import { copyOut, inPhysicalOrder } from './rows-tables'
import { findVersionById, listColumns, type VersionRecord } from '../repositories/datasets.repo'
import { defaultConn, type Conn } from '../repositories/connection'
import { logger } from '../logger'

export async function shapeOf(version: VersionRecord, conn: Conn = defaultConn): Promise<RowTableShape> {
  return shapeFrom(version, await listColumns(version.id, conn))
}

/** The row table's shape from the version's columns when the caller has them already (they never change). */
export function shapeFrom(
  version: VersionRecord,
  columns: readonly Pick<ColumnProfile, 'name' | 'position' | 'type'>[],
): RowTableShape {
  return {
    versionId: version.id,
    decimalMark: version.decimalMark,
    naValues: version.naValues,
    columns: new Map(columns.map((c) => [c.name, { position: c.position, type: c.type }])),
  }
}

export interface ColumnRequest {
  name: string
  as: 'factor' | 'number'
}

export interface FactorColumn {
  name: string
  /** Codes into `labels` in order of first appearance; -1 for a missing label. */
  codes: Int32Array
  labels: string[]
}

export interface ReadColumns {
  /** Kept rows read, in file order. */
  count: number
  /** row_no of each kept row (data row number, 1-based). */
  rowNos: Float64Array
  factors: Map<string, FactorColumn>
  /** NaN for a missing cell or one that is not a number (see `notNumbers`). */
  numbers: Map<string, Float64Array>
  /** First kept cell per number column that holds text that is not a number, or overflows. */
  notNumbers: Map<string, { rowNo: number; value: string }>
}

/**
 * Reads the asked columns of a version's kept rows with one `COPY (SELECT …) TO STDOUT`, parsed by
 * hand into typed arrays: factors as codes (labels trimmed, as in the profile), numbers by the
 * version's decimal mark. Far faster than row objects for a million rows.
 */
export async function readColumns(
  version: VersionRecord,
  shape: RowTableShape,
  requests: readonly ColumnRequest[],
  exclusions: readonly Pick<Exclusion, 'kind' | 'rule' | 'unit'>[],
  conn: Conn = defaultConn,
): Promise<ReadColumns> {
  return readColumnsWith(version, shape, requests, exclusions, conn, false)
}

function readColumnsSorted(
  version: VersionRecord,
  shape: RowTableShape,
  requests: readonly ColumnRequest[],
  exclusions: readonly Pick<Exclusion, 'kind' | 'rule' | 'unit'>[],
  conn: Conn,
) {
  return readColumnsWith(version, shape, requests, exclusions, conn, true)
}

async function readColumnsWith(
  version: VersionRecord,
  shape: RowTableShape,
  requests: readonly ColumnRequest[],
  exclusions: readonly Pick<Exclusion, 'kind' | 'rule' | 'unit'>[],
  conn: Conn,
  sorted: boolean,
): Promise<ReadColumns> {
  const positions = requests.map((r) => {
    const column = shape.columns.get(r.name)
    if (!column) throw new NotFoundError(`The column "${r.name}" is not in this version.`)
    return column.position
  })
  const capacity = version.rowCount
  const rowNos = new Float64Array(capacity)
  const na = new Set(version.naValues)
  // Missing-value words that read as numbers (say "-999"): only these need a lookup on the fast path.
  const numericNa = new Set(version.naValues.filter((v) => v.trim() !== '' && Number.isFinite(Number(v))))
  const mark = version.decimalMark
  const factorState = requests.map((r) =>
    r.as === 'factor'
      ? {
          codes: new Int32Array(capacity),
          labels: [] as string[],
          index: new Map<string, number>(),
          lastRaw: '\u0000',
          lastCode: -1,
        }
      : null,
  )
  const numberState = requests.map((r) => (r.as === 'number' ? new Float64Array(capacity) : null))
  // Columns profiled as numbers hold only number-shaped cells besides missing ones, so Number() is exact there.
  const profiledNumeric = requests.map((r) => {
    const type = shape.columns.get(r.name)?.type
    return type === 'integer' || type === 'numeric'
  })
  const notNumbers = new Map<string, { rowNo: number; value: string }>()
  let count = 0
  let lastRowNo = 0
  let inOrder = true

  const strictNumber = (k: number, raw: string, rowNo: number): number => {
    const decoded = raw === '\\N' ? '' : (decodeCopyTextField(raw) ?? '')
    const text = trimCell(decoded)
    if (na.has(text)) return NaN
    const value = parseNumberText(text, mark)
    if (Number.isFinite(value)) return value
    if (!notNumbers.has(requests[k].name)) notNumbers.set(requests[k].name, { rowNo, value: text })
    return NaN
  }

  const reader = new CopyTextLines((line, start, end) => {
    const i = count++
    let to = fieldEnd(line, start, end)
    const rowNo = Number(line.slice(start, to))
    if (rowNo <= lastRowNo) inOrder = false
    lastRowNo = rowNo
    rowNos[i] = rowNo
    for (let k = 0; k < requests.length; k++) {
      const from = to + 1
      to = fieldEnd(line, from, end)
      const raw = line.slice(from, to)
      const factor = factorState[k]
      if (factor) {
        // Grouping columns repeat a label for many rows in a row: compare with the last one first.
        if (raw === factor.lastRaw) {
          factor.codes[i] = factor.lastCode
          continue
        }
        const text = raw === '\\N' ? '' : trimCell(decodeCopyTextField(raw) ?? '')
        let code = factor.index.get(text)
        if (code === undefined) {
          if (na.has(text)) code = -1
          else {
            code = factor.labels.length
            factor.labels.push(text)
          }
          factor.index.set(text, code)
        }
        factor.codes[i] = code
        factor.lastRaw = raw
        factor.lastCode = code
      } else {
        const out = numberState[k]!
        if (profiledNumeric[k] && raw !== '\\N' && raw !== '') {
          const value = Number(mark === ',' ? raw.replace(',', '.') : raw)
          if (Number.isFinite(value) && (numericNa.size === 0 || !numericNa.has(trimCell(raw)))) {
            out[i] = value
            continue
          }
        }
        out[i] = strictNumber(k, raw, rowNo)
      }
    }
  })
  const excluded = excludedSql(shape, exclusions)
  const consume = async (stream: Readable) => {
    for await (const chunk of stream) reader.push(chunk as Buffer)
    reader.end()
  }
  if (sorted) await copyOut(readBackSelect(shape, positions, excluded, true), consume, conn)
  else
    await inPhysicalOrder(
      (trx) => copyOut(readBackSelect(shape, positions, excluded, false), consume, trx),
      conn,
    )
  if (!inOrder && !sorted) {
    // Not expected for tables written once by COPY; read again, sorted, rather than return rows out of order.
    logger.warn('read-back rows came out of file order; reading again sorted', { versionId: version.id })
    return readColumnsSorted(version, shape, requests, exclusions, conn)
  }
  const factors = new Map<string, FactorColumn>()
  const numbers = new Map<string, Float64Array>()
  requests.forEach((r, k) => {
    const factor = factorState[k]
    if (factor)
      factors.set(r.name, { name: r.name, codes: factor.codes.subarray(0, count), labels: factor.labels })
    else numbers.set(r.name, numberState[k]!.subarray(0, count))
  })
  return { count, rowNos: rowNos.subarray(0, count), factors, numbers, notNumbers }
}

export interface ReadBackTagging {
  /** The one response column to load (a tagging may name several). */
  response: string
  /** The response's distribution; absent: gaussian (numbers). */
  family?: 'gaussian' | 'binomial' | 'poisson'
  /** Binomial only: the column of trials (the response then holds successes). */
  trials?: string | null
  /** Binomial without trials: the response value counted as yes; null: decided from the values. */
  positive?: string | null
  /** Condition factors, none to two. */
  conditions: readonly string[]
  /** Numeric covariates. */
  covariates: readonly string[]
  /** Outermost first. */
  levels: readonly string[]
}

/** File row of a data row, for messages ("row 57" as the spreadsheet shows it). */
export const fileRow = (version: Pick<VersionRecord, 'headerRow'>, rowNo: number) => version.headerRow + rowNo

/** The engine's columns, and for a yes/no response read from two values, which one was yes. */
export type ReadBackColumns = NestedColumns & {
  outcome?: { positive: string; negative: string | null }
}

/**
 * The engine's input for one response of a tagged version: kept rows only (exclusions applied),
 * in file order, factor codes for the levels and the conditions, numbers for the response and the
 * covariates, NaN for a missing number (the engine leaves such a row out and counts it).
 * A binomial response without trials is read as values and turned into 0/1 (the value counted
 * as yes is 1, see readBinaryResponse); with trials, the trials column is read as numbers too.
 * Refuses (422, naming the row) a kept row without a label at some level or condition, a
 * response, trials or covariate cell that holds text which is not a number, and a yes/no
 * response with a third value (the settings check refuses these first, with a 400).
 *
 * @param exclusions defaults to the version's active exclusions
 */
export async function loadNestedColumns(
  versionId: number,
  tagging: ReadBackTagging,
  exclusions?: readonly Pick<Exclusion, 'kind' | 'rule' | 'unit'>[],
  conn: Conn = defaultConn,
): Promise<ReadBackColumns> {
  const version = await findVersionById(versionId, conn)
  if (!version) throw new NotFoundError('Dataset version not found.')
  const shape = await shapeOf(version, conn)
  const applied = exclusions ?? (await activeExclusions(versionId, conn))
  const family = tagging.family ?? 'gaussian'
  const trials = family === 'binomial' ? (tagging.trials ?? null) : null
  const yesNo = family === 'binomial' && trials === null
  const numberColumns = [
    ...(yesNo ? [] : [tagging.response]),
    ...(trials ? [trials] : []),
    ...tagging.covariates,
  ]
  const factorColumns = [...(yesNo ? [tagging.response] : []), ...tagging.levels, ...tagging.conditions]
  const requests: ColumnRequest[] = [
    ...numberColumns.map((name) => ({ name, as: 'number' as const })),
    ...factorColumns.map((name) => ({ name, as: 'factor' as const })),
  ]
  const read = await readColumns(version, shape, requests, applied, conn)
  for (const name of numberColumns) {
    const notNumber = read.notNumbers.get(name)
    if (!notNumber) continue
    const row = fileRow(version, notNumber.rowNo)
    throw new UnprocessableError(
      `Row ${row} of “${name}” holds “${notNumber.value}”, which is not a number. Exclude that row or correct the file.`,
      { column: name, row },
    )
  }
  const toFactor = (name: string): Factor => {
    const column = read.factors.get(name)!
    const missingAt = column.codes.indexOf(-1)
    if (missingAt !== -1) {
      const row = fileRow(version, read.rowNos[missingAt])
      throw new UnprocessableError(
        `Row ${row} has no value in “${name}”. Every row needs a label there; exclude such rows with the rule “${name} is missing”.`,
        { column: name, row },
      )
    }
    return { name, codes: column.codes, labels: column.labels }
  }
  const columns: ReadBackColumns = {
    responseName: tagging.response,
    response: yesNo ? new Float64Array(0) : read.numbers.get(tagging.response)!,
    levels: tagging.levels.map(toFactor),
    factors: tagging.conditions.map(toFactor),
    covariates: tagging.covariates.map((name) => ({ name, values: read.numbers.get(name)! })),
  }
  if (family !== 'gaussian') columns.family = family
  if (trials) {
    columns.trials = read.numbers.get(trials)!
    columns.trialsName = trials
  }
  if (yesNo) {
    const column = read.factors.get(tagging.response)!
    const reading = readBinaryResponse(column.labels, column.codes, tagging.positive ?? null, (text) =>
      parseNumberText(text, version.decimalMark),
    )
    if ('problem' in reading) throw binaryRefusal(reading.problem, tagging.response, version, read.rowNos)
    columns.response = reading.values
    columns.outcome = { positive: reading.positive, negative: reading.negative }
  }
  return columns
}

function binaryRefusal(
  problem: BinaryProblem,
  name: string,
  version: VersionRecord,
  rowNos: Float64Array,
): UnprocessableError {
  if (problem.kind === 'unknown-positive')
    return new UnprocessableError(
      `“${problem.positive}” is not a value of “${name}” (it has ${problem.values.map((v) => `“${v}”`).join(' and ')}).`,
      { column: name },
    )
  const row = fileRow(version, rowNos[problem.row])
  return new UnprocessableError(
    `Row ${row} of “${name}” holds “${problem.value}”, a third value besides “${problem.values[0]}” and “${problem.values[1]}”: a yes/no response has two. Exclude such rows or correct the file.`,
    { column: name, row },
  )
}
