import type { Knex } from 'knex'
import { db } from '../db'

/** The shared knex instance or an open transaction; every repository function takes one (default: `db`). */
export type Conn = Knex | Knex.Transaction

export const defaultConn: Conn = db
