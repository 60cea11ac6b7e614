import knex from 'knex'
import pg from 'pg'
import knexConfig from '../knexfile'

// Return NUMERIC and BIGINT counts as JS numbers: our counts stay far below 2^53.
pg.types.setTypeParser(pg.types.builtins.INT8, (v) => Number(v))
pg.types.setTypeParser(pg.types.builtins.NUMERIC, (v) => Number(v))

export const db = knex(knexConfig)
export type Db = typeof db
