import type { Knex } from 'knex'
import { from as copyFrom, to as copyTo } from 'pg-copy-streams'
import type { Readable, Writable } from 'node:stream'
import { defaultConn, transactionClient, withClient, type Conn } from '../repositories/connection'

/**
 * The per-version row tables: `dataset_rows_<version id>` with `row_no` (file order, 1-based) and one
 * text column per file column, `c1` … `cN` (names live in dataset_columns). Identifiers are built
 * from integers only, never from user text.
 */

export function rowsTable(versionId: number): string {
  if (!Number.isSafeInteger(versionId) || versionId <= 0) throw new Error(`invalid version id ${versionId}`)
  return `dataset_rows_${versionId}`
}

export function cellColumn(position: number): string {
  if (!Number.isSafeInteger(position) || position <= 0) throw new Error(`invalid column position ${position}`)
  return `c${position}`
}

const columnList = (count: number) => Array.from({ length: count }, (_, k) => cellColumn(k + 1)).join(', ')

export async function createRowsTable(
  trx: Knex.Transaction,
  versionId: number,
  columnCount: number,
): Promise<void> {
  const columns = Array.from({ length: columnCount }, (_, k) => `${cellColumn(k + 1)} text`).join(', ')
  // Identity cache: fewer sequence updates while COPY numbers a million rows.
  await trx.raw(
    `CREATE TABLE ${rowsTable(versionId)} (row_no bigint GENERATED ALWAYS AS IDENTITY (CACHE 1000), ${columns})`,
  )
}

/**
 * Makes a version's rows final: once the upload that wrote them is stored, any INSERT, UPDATE,
 * DELETE or TRUNCATE on the table fails (the function is made by the migration that introduced
 * it), as finished analysis versions are frozen. Analyses and sign-offs refer to these exact rows.
 */
export async function freezeRowsTable(trx: Knex.Transaction, versionId: number): Promise<void> {
  const table = rowsTable(versionId)
  await trx.raw(
    `CREATE TRIGGER ${table}_frozen BEFORE INSERT OR UPDATE OR DELETE OR TRUNCATE ON ${table} FOR EACH STATEMENT EXECUTE FUNCTION dataset_rows_frozen()`,
  )
}

/**
 * Rows are never updated, so row_no follows the physical order: a BRIN index is tiny and quick to
 * build, and lets preview pages jump to a row range. Built after the upload commits (queries work
 * without it, only slower), so the uploader does not wait for it.
 */
export async function indexRowsTable(versionId: number, conn: Conn = defaultConn): Promise<void> {
  const table = rowsTable(versionId)
  await conn.raw(`CREATE INDEX IF NOT EXISTS ${table}_row_no ON ${table} USING brin (row_no)`)
}

/** Row tables that have no row_no index yet (an index build cut short by a restart). */
export async function listUnindexedRowsTables(conn: Conn = defaultConn): Promise<number[]> {
  const result = await conn.raw(
    `SELECT t.tablename FROM pg_tables t
     WHERE t.schemaname = current_schema() AND t.tablename ~ '^dataset_rows_[0-9]+$'
       AND NOT EXISTS (SELECT 1 FROM pg_indexes i WHERE i.schemaname = t.schemaname AND i.tablename = t.tablename)`,
  )
  return (result.rows as { tablename: string }[]).map((r) =>
    Number(r.tablename.slice('dataset_rows_'.length)),
  )
}

export async function dropRowsTable(conn: Conn, versionId: number): Promise<void> {
  await conn.raw(`DROP TABLE IF EXISTS ${rowsTable(versionId)}`)
}

const sqlLiteral = (text: string) => (text === '\t' ? `E'\\t'` : `'${text.replaceAll("'", "''")}'`)

export type CopyInFormat = { kind: 'csv'; delimiter: string } | { kind: 'text' }

/**
 * A writable COPY … FROM STDIN into the version's table inside the transaction. CSV: the file's own
 * bytes (UTF-8), header line skipped by PostgreSQL. Text: rows we encoded ourselves.
 * Destroying the stream before it finishes makes PostgreSQL abandon the COPY.
 */
export async function openCopyIn(
  trx: Knex.Transaction,
  versionId: number,
  columnCount: number,
  format: CopyInFormat,
): Promise<Writable & { rowCount: number }> {
  // FREEZE: the table was created in this same (sub)transaction, so rows can be written frozen and
  // all-visible; the first reads after the upload then skip setting hint bits on every page.
  const options =
    format.kind === 'csv'
      ? `FORMAT csv, HEADER true, DELIMITER ${sqlLiteral(format.delimiter)}, ENCODING 'UTF8', FREEZE true`
      : `FORMAT text, ENCODING 'UTF8', FREEZE true`
  const sql = `COPY ${rowsTable(versionId)} (${columnList(columnCount)}) FROM STDIN (${options})`
  const client = await transactionClient(trx)
  return client.query(copyFrom(sql))
}

/**
 * Runs SQL built from positions and escaped literals (see datasets-row-queries.repo) as it is.
 * knex.raw would rewrite every "?" — including those inside regular expressions and literals —
 * into bind placeholders, so these queries bypass it.
 */
export async function queryBuilt<T>(sql: string, conn: Conn = defaultConn): Promise<T[]> {
  return withClient(conn, async (client) => (await client.query(sql)).rows as T[])
}

/**
 * Streams `COPY (<select>) TO STDOUT` in text format to `consume`. The select is built by the caller
 * from integer-derived identifiers and escaped literals only (COPY takes no bind parameters).
 */
export async function copyOut(
  select: string,
  consume: (stream: Readable) => Promise<void>,
  conn: Conn = defaultConn,
): Promise<void> {
  await withClient(conn, (client) => consume(client.query(copyTo(`COPY (${select}) TO STDOUT`))))
}

/**
 * Runs a read-back in a transaction where a plain sequential scan returns the rows in the order
 * COPY wrote them: rows are never updated, so the heap is in row_no order; we only stop scans from
 * joining another scan midway (synchronize_seqscans) or splitting across workers. This spares
 * sorting a million rows. The caller still checks row_no rises and falls back to ORDER BY if not.
 */
export async function inPhysicalOrder<T>(
  work: (trx: Knex.Transaction) => Promise<T>,
  conn: Conn = defaultConn,
): Promise<T> {
  return conn.transaction(async (trx) => {
    await trx.raw('SET LOCAL synchronize_seqscans = off')
    await trx.raw('SET LOCAL max_parallel_workers_per_gather = 0')
    return work(trx)
  })
}

/** Row-table names present in the schema, for the startup sweep. */
export async function listRowsTables(conn: Conn = defaultConn): Promise<number[]> {
  const result = await conn.raw(
    `SELECT tablename FROM pg_tables WHERE schemaname = current_schema() AND tablename ~ '^dataset_rows_[0-9]+$'`,
  )
  return (result.rows as { tablename: string }[]).map((r) =>
    Number(r.tablename.slice('dataset_rows_'.length)),
  )
}
