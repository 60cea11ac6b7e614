import type { Knex } from 'knex'
import type pg from 'pg'
import { db } from '../db'

/** The shared knex instance or an open transaction; every repository function takes one (default: `db`). */
export type Conn = Knex | Knex.Transaction

export const defaultConn: Conn = db

/** The node-postgres client behind a knex transaction (the connection the transaction runs on). */
export async function transactionClient(trx: Knex.Transaction): Promise<pg.PoolClient> {
  return (await trx.client.acquireConnection()) as pg.PoolClient
}

/** Runs `work` on the node-postgres client behind `conn` (the transaction's own, or one from the pool). */
export async function withClient<T>(conn: Conn, work: (client: pg.PoolClient) => Promise<T>): Promise<T> {
  const isTransaction = 'isTransaction' in conn && (conn as Knex.Transaction).isTransaction
  const client = isTransaction
    ? await transactionClient(conn as Knex.Transaction)
    : ((await conn.client.acquireConnection()) as pg.PoolClient)
  try {
    return await work(client)
  } finally {
    if (!isTransaction) await conn.client.releaseConnection(client)
  }
}

/**
 * A query run as a named prepared statement: PostgreSQL parses and plans it once per connection
 * instead of on every call, and knex's query builder is skipped. For the queries every signed-in
 * request runs (who is signed in, the analyses list); parameters are $1, $2, … as in node-postgres.
 */
export function preparedQuery<Row>(name: string, text: string) {
  return async (values: unknown[], conn: Conn = defaultConn): Promise<Row[]> =>
    withClient(
      conn,
      async (client) => (await client.query<Row & pg.QueryResultRow>({ name, text, values })).rows,
    )
}
