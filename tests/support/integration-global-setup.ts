import { register } from 'tsx/esm/api'
import { ensurePostgres } from '../../scripts/lib/postgres'
import { prepareDatabase } from '../../scripts/lib/database'

// Integration tests run against the real PostgreSQL, in their own database, migrated fresh once per run.
export default async function setup(): Promise<void> {
  // knex imports the TypeScript migrations with Node's own import(); vitest's runner does not cover that.
  const unregister = register()
  ensurePostgres()
  try {
    await prepareDatabase(process.env.PGDATABASE ?? 'nestwise_test', { fresh: true })
  } finally {
    await unregister()
  }
}
