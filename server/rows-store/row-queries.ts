import type { ColumnType, Exclusion, ExclusionRule, ExclusionUnit } from '../../shared/schemas/datasets'
import { numberPatternSql, TRIM_CHARS_SQL, type DecimalMark } from './number-text'
import { cellColumn, queryBuilt, rowsTable } from './rows-tables'
import { defaultConn, type Conn } from '../repositories/connection'

/**
 * SQL over a version's row table. Everything here is built from column positions (integers) and
 * escaped literals, never from raw user text, because COPY (used for read-back) takes no bind
 * parameters; the same builders serve the paged preview so both agree on what "excluded" means.
 */

export interface RowTableShape {
  versionId: number
  decimalMark: DecimalMark
  naValues: readonly string[]
  /** Column name → position and inferred type. */
  columns: ReadonlyMap<string, { position: number; type: ColumnType }>
}

/** A string literal safe whatever standard_conforming_strings says. */
export function sqlText(value: string): string {
  return `E'${value.replaceAll('\\', '\\\\').replaceAll("'", "''")}'`
}

const trimmed = (position: number) => `btrim(${cellColumn(position)}, ${TRIM_CHARS_SQL})`

const naArray = (shape: RowTableShape) => `ARRAY[${shape.naValues.map(sqlText).join(', ')}]::text[]`

/** True when the cell is missing: NULL, empty or one of the version's missing-value words. */
export function missingSql(shape: RowTableShape, position: number): string {
  return `(${cellColumn(position)} IS NULL OR ${trimmed(position)} = ANY(${naArray(shape)}))`
}

/** The cell as a number (numeric, so even 1e400 casts), NULL when it is not written as one. */
export function numberSql(shape: RowTableShape, position: number): string {
  const t = trimmed(position)
  return `(CASE WHEN ${t} ~ '${numberPatternSql(shape.decimalMark)}' THEN replace(${t}, ',', '.')::numeric END)`
}

const COMPARISON: Record<Exclude<ExclusionRule['operator'], 'missing'>, string> = {
  eq: '=',
  ne: '<>',
  lt: '<',
  le: '<=',
  gt: '>',
  ge: '>=',
}

const isNumericType = (type: ColumnType) => type === 'integer' || type === 'numeric'

/**
 * A rule as SQL. Numeric columns compare as numbers, text columns as trimmed text (equal / not
 * equal only). Comparisons never match a missing cell: "missing" is its own operator.
 * The service has checked the column, operator and value beforehand.
 */
export function ruleSql(shape: RowTableShape, rule: ExclusionRule): string {
  const column = shape.columns.get(rule.column)
  if (!column) throw new Error(`unknown column ${rule.column}`)
  if (rule.operator === 'missing') return missingSql(shape, column.position)
  const op = COMPARISON[rule.operator]
  if (isNumericType(column.type) && typeof rule.value === 'number') {
    return `(${numberSql(shape, column.position)} ${op} ${numericLiteral(rule.value)})`
  }
  return `(NOT ${missingSql(shape, column.position)} AND ${trimmed(column.position)} ${op} ${sqlText(String(rule.value))})`
}

function numericLiteral(value: number): string {
  if (!Number.isFinite(value)) throw new Error('rule value must be finite')
  return `${String(value)}::numeric`
}

export function unitSql(shape: RowTableShape, unit: ExclusionUnit): string {
  const parts = unit.path.map((step) => {
    const column = shape.columns.get(step.column)
    if (!column) throw new Error(`unknown column ${step.column}`)
    return `${trimmed(column.position)} = ${sqlText(step.value)}`
  })
  return `(${parts.join(' AND ')})`
}

export function exclusionSql(
  shape: RowTableShape,
  exclusion: Pick<Exclusion, 'kind' | 'rule' | 'unit'>,
): string {
  return exclusion.kind === 'rule' ? ruleSql(shape, exclusion.rule!) : unitSql(shape, exclusion.unit!)
}

/** True for rows any of the exclusions leaves out ("false" when there are none). */
export function excludedSql(
  shape: RowTableShape,
  exclusions: readonly Pick<Exclusion, 'kind' | 'rule' | 'unit'>[],
): string {
  if (!exclusions.length) return 'false'
  return `(${exclusions.map((e) => `coalesce(${exclusionSql(shape, e)}, false)`).join(' OR ')})`
}

export async function countRowsWhere(
  shape: RowTableShape,
  predicate: string,
  conn: Conn = defaultConn,
): Promise<number> {
  const [row] = await queryBuilt<{ n: string }>(
    `SELECT count(*)::bigint AS n FROM ${rowsTable(shape.versionId)} WHERE ${predicate}`,
    conn,
  )
  return Number(row.n)
}

/** First kept row whose cell is present but not a number, for "row 57 holds 'abc'" messages. */
export async function firstNonNumberRow(
  shape: RowTableShape,
  position: number,
  excluded: string,
  conn: Conn = defaultConn,
): Promise<{ rowNo: number; value: string } | null> {
  const c = cellColumn(position)
  const [row] = await queryBuilt<{ row_no: string; value: string }>(
    `SELECT row_no, ${c} AS value FROM ${rowsTable(shape.versionId)}
     WHERE NOT ${excluded} AND NOT ${missingSql(shape, position)} AND ${numberSql(shape, position)} IS NULL
     ORDER BY row_no LIMIT 1`,
    conn,
  )
  return row ? { rowNo: Number(row.row_no), value: row.value } : null
}

/**
 * The first kept row of each of the first `limit` distinct values of a column, in row order
 * (trimmed text; in a column profiled as numbers, "1" and "1.0" are one value). Missing cells are
 * not values. One hash aggregate over the rows, then a lookup of at most `limit` rows.
 */
export async function firstRowsOfDistinctValues(
  shape: RowTableShape,
  column: { position: number; type: ColumnType },
  excluded: string,
  limit: number,
  conn: Conn = defaultConn,
): Promise<{ rowNo: number; value: string }[]> {
  const table = rowsTable(shape.versionId)
  const { position } = column
  // numeric equality ignores trailing zeros, and so does its normalised text: "1" and "1.0" group together.
  const key = isNumericType(column.type)
    ? `coalesce(trim_scale(${numberSql(shape, position)})::text, ${trimmed(position)})`
    : trimmed(position)
  const rows = await queryBuilt<{ row_no: string; value: string }>(
    `WITH firsts AS (
       SELECT min(row_no) AS row_no FROM ${table}
        WHERE NOT ${excluded} AND NOT ${missingSql(shape, position)}
        GROUP BY ${key} ORDER BY 1 LIMIT ${Math.max(1, Math.floor(limit))}
     )
     SELECT t.row_no, ${trimmed(position)} AS value FROM ${table} t JOIN firsts USING (row_no) ORDER BY t.row_no`,
    conn,
  )
  return rows.map((row) => ({ rowNo: Number(row.row_no), value: row.value }))
}

/** A kept row whose cells break a rule, with the cells asked for (trimmed). */
export interface OffendingRow {
  rowNo: number
  values: string[]
}

/**
 * The first kept row (in file order) where a count column holds something other than a whole
 * number of at least `minimum` (text, a fraction, a negative number), missing cells aside.
 */
export async function firstRowNotWholeNumber(
  shape: RowTableShape,
  position: number,
  minimum: number,
  excluded: string,
  conn: Conn = defaultConn,
): Promise<OffendingRow | null> {
  const n = numberSql(shape, position)
  return firstRowWhere(
    shape,
    `NOT ${missingSql(shape, position)} AND (${n} IS NULL OR ${n} < ${numericLiteral(minimum)} OR ${n} <> trunc(${n}))`,
    [position],
    excluded,
    conn,
  )
}

/** The first kept row where the successes exceed the trials (both present and numbers). */
export async function firstRowSuccessesAboveTrials(
  shape: RowTableShape,
  successes: number,
  trials: number,
  excluded: string,
  conn: Conn = defaultConn,
): Promise<OffendingRow | null> {
  return firstRowWhere(
    shape,
    `${numberSql(shape, successes)} > ${numberSql(shape, trials)}`,
    [successes, trials],
    excluded,
    conn,
  )
}

async function firstRowWhere(
  shape: RowTableShape,
  condition: string,
  positions: number[],
  excluded: string,
  conn: Conn,
): Promise<OffendingRow | null> {
  const cells = positions.map((p, k) => `${trimmed(p)} AS v${k}`).join(', ')
  const [row] = await queryBuilt<Record<string, string>>(
    `SELECT row_no, ${cells} FROM ${rowsTable(shape.versionId)}
     WHERE NOT ${excluded} AND ${condition} ORDER BY row_no LIMIT 1`,
    conn,
  )
  return row ? { rowNo: Number(row.row_no), values: positions.map((_, k) => row[`v${k}`]) } : null
}

/** Distinct labels of two factor columns over the kept rows, and how they pair up. */
export interface CrossedLabelCounts {
  /** Distinct labels of each column among kept rows where it has one. */
  first: number
  second: number
  /** One label of each (the smallest), to name a constant column. */
  firstExample: string | null
  secondExample: string | null
  /** Among kept rows labelled in both: distinct pairs, and distinct labels of each column. */
  pairs: number
  firstPaired: number
  secondPaired: number
}

/**
 * Counts the labels of two factor columns over the kept rows and their distinct pairs, in one
 * scan: enough to tell a constant factor and two factors that are the same split under two names.
 */
export async function crossedLabelCounts(
  shape: RowTableShape,
  firstPosition: number,
  secondPosition: number,
  excluded: string,
  conn: Conn = defaultConn,
): Promise<CrossedLabelCounts> {
  // One hash aggregate over the rows down to the distinct pairs (a few), then counts over those.
  const label = (position: number) =>
    `CASE WHEN ${missingSql(shape, position)} THEN NULL ELSE ${trimmed(position)} END`
  const [row] = await queryBuilt<Record<string, string | null>>(
    `WITH pairs AS (
       SELECT a, b FROM (
         SELECT ${label(firstPosition)} AS a, ${label(secondPosition)} AS b
           FROM ${rowsTable(shape.versionId)} WHERE NOT ${excluded}
       ) labelled GROUP BY a, b
     )
     SELECT count(DISTINCT a) AS first,
            count(DISTINCT b) AS second,
            min(a) AS first_example,
            min(b) AS second_example,
            count(*) FILTER (WHERE a IS NOT NULL AND b IS NOT NULL) AS pairs,
            count(DISTINCT a) FILTER (WHERE b IS NOT NULL) AS first_paired,
            count(DISTINCT b) FILTER (WHERE a IS NOT NULL) AS second_paired
       FROM pairs`,
    conn,
  )
  return {
    first: Number(row.first),
    second: Number(row.second),
    firstExample: row.first_example,
    secondExample: row.second_example,
    pairs: Number(row.pairs),
    firstPaired: Number(row.first_paired),
    secondPaired: Number(row.second_paired),
  }
}

/** Per factor: its distinct labels, and units of each nesting level (outermost first) without and with it. */
export interface FactorAcrossLevels {
  labels: number
  units: number[]
  unitsByFactor: number[]
}

/**
 * Counts, over the kept rows that have every label, the labels of each factor column and, for
 * each nesting level, its units and its (unit, factor label) pairs, in one scan down to the
 * distinct label tuples: enough to tell where a factor varies and whether it just renames a
 * level's units.
 */
export async function factorsAcrossLevels(
  shape: RowTableShape,
  levelPositions: readonly number[],
  factorPositions: readonly number[],
  excluded: string,
  conn: Conn = defaultConn,
): Promise<FactorAcrossLevels[]> {
  const label = (position: number) =>
    `CASE WHEN ${missingSql(shape, position)} THEN NULL ELSE ${trimmed(position)} END`
  const levels = levelPositions.map((_, d) => `l${d}`)
  const factors = factorPositions.map((_, i) => `f${i}`)
  const prefix = (d: number) => levels.slice(0, d + 1).join(', ')
  const counts = factors.flatMap((f, i) => [
    `count(DISTINCT ${f}) AS labels${i}`,
    ...levels.map((_, d) => `count(DISTINCT ROW(${prefix(d)}, ${f})) AS uf${i}_${d}`),
  ])
  const selected = [
    ...levelPositions.map((p, d) => `${label(p)} AS l${d}`),
    ...factorPositions.map((p, i) => `${label(p)} AS f${i}`),
  ]
  const all = [...levels, ...factors]
  const [row] = await queryBuilt<Record<string, string>>(
    `WITH tuples AS (
       SELECT ${all.join(', ')} FROM (
         SELECT ${selected.join(', ')} FROM ${rowsTable(shape.versionId)} WHERE NOT ${excluded}
       ) labelled
       WHERE ${all.map((n) => `${n} IS NOT NULL`).join(' AND ')}
       GROUP BY ${all.join(', ')}
     )
     SELECT ${levels.map((_, d) => `count(DISTINCT ROW(${prefix(d)})) AS u${d}`).join(', ')}, ${counts.join(', ')}
       FROM tuples`,
    conn,
  )
  const units = levels.map((_, d) => Number(row[`u${d}`]))
  return factors.map((_, i) => ({
    labels: Number(row[`labels${i}`]),
    units,
    unitsByFactor: levels.map((_, d) => Number(row[`uf${i}_${d}`])),
  }))
}

export interface PageRequest {
  offset: number
  limit: number
  sortPosition: number | null
  sortNumeric: boolean
  sortDesc: boolean
  show: 'all' | 'included' | 'excluded'
  exclusions: readonly Pick<Exclusion, 'id' | 'kind' | 'rule' | 'unit'>[]
  columnCount: number
}

export interface PageRow {
  rowNo: number
  values: (string | null)[]
  excludedBy: number[]
}

/**
 * One page of rows in file order or sorted by a column (numbers numerically, missing last), with
 * the exclusions that leave each row out. Unsorted pages of all rows use the row_no range directly.
 */
export async function pageRows(
  shape: RowTableShape,
  page: PageRequest,
  conn: Conn = defaultConn,
): Promise<PageRow[]> {
  const table = rowsTable(shape.versionId)
  const cells = Array.from({ length: page.columnCount }, (_, k) => cellColumn(k + 1)).join(', ')
  const excluded = excludedSql(shape, page.exclusions)
  const excludedBy = page.exclusions.length
    ? `array_remove(ARRAY[${page.exclusions.map((e) => `CASE WHEN coalesce(${exclusionSql(shape, e)}, false) THEN ${Number(e.id)} END`).join(', ')}]::bigint[], NULL)`
    : `'{}'::bigint[]`
  let where = page.show === 'included' ? `NOT ${excluded}` : page.show === 'excluded' ? excluded : 'true'
  let order = 'row_no'
  let limit = `LIMIT ${page.limit} OFFSET ${page.offset}`
  if (page.sortPosition !== null) {
    const key = page.sortNumeric ? numberSql(shape, page.sortPosition) : trimmed(page.sortPosition)
    const direction = page.sortDesc ? 'DESC' : 'ASC'
    order = `${key} ${direction} NULLS LAST, row_no ${direction}`
  } else if (page.show === 'all') {
    // row_no is 1…N without gaps (rows are never deleted), so a page is a range.
    where = page.sortDesc
      ? `row_no <= (SELECT max(row_no) FROM ${table}) - ${page.offset}`
      : `row_no > ${page.offset}`
    order = page.sortDesc ? 'row_no DESC' : 'row_no'
    limit = `LIMIT ${page.limit}`
  } else if (page.sortDesc) order = 'row_no DESC'
  const rows = await queryBuilt<Record<string, unknown>>(
    `SELECT row_no, ${cells}, ${excludedBy} AS excluded_by FROM ${table} WHERE ${where} ORDER BY ${order} ${limit}`,
    conn,
  )
  return rows.map((row) => ({
    rowNo: Number(row.row_no),
    values: Array.from({ length: page.columnCount }, (_, k) => row[cellColumn(k + 1)] as string | null),
    excludedBy: (row.excluded_by as (number | string)[]).map(Number),
  }))
}

/**
 * The SELECT for read-back: row_no then the asked cells, kept rows only. Unordered, it relies on
 * the physical order (see readInFileOrder); ordered, it sorts by row_no.
 */
export function readBackSelect(
  shape: RowTableShape,
  positions: readonly number[],
  excluded: string,
  ordered: boolean,
): string {
  const cells = positions.map((p) => cellColumn(p)).join(', ')
  return `SELECT row_no, ${cells} FROM ${rowsTable(shape.versionId)} WHERE NOT ${excluded}${ordered ? ' ORDER BY row_no' : ''}`
}
