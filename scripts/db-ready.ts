// Starts the local PostgreSQL cluster (installing it when missing) and prepares the development database.
import { ensurePostgres } from './lib/postgres'
import { prepareDatabase } from './lib/database'
import { config } from '../server/config'

ensurePostgres()
await prepareDatabase(config.PGDATABASE, { seed: process.argv.includes('--seed') })
console.log(`[setup] database ${config.PGDATABASE} ready on ${config.PGHOST}:${config.PGPORT}`)
