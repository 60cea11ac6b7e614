import type { Knex } from 'knex'
import { config } from './server/config'

// One configuration; tests point PGDATABASE at their own database.
const knexConfig: Knex.Config = {
  client: 'pg',
  connection: {
    host: config.PGHOST,
    port: config.PGPORT,
    user: config.PGUSER,
    password: config.PGPASSWORD,
    database: config.PGDATABASE,
  },
  pool: { min: 0, max: 10 },
  migrations: { directory: './migrations', extension: 'ts', loadExtensions: ['.ts'] },
  seeds: { directory: './seeds', extension: 'ts', loadExtensions: ['.ts'] },
}

export default knexConfig
