import { ensurePostgres } from '../../scripts/lib/postgres'
import { prepareDatabase } from '../../scripts/lib/database'

// Integration tests run against the real PostgreSQL, in their own database, migrated fresh once per run.
export default async function setup(): Promise<void> {
  ensurePostgres()
  await prepareDatabase(process.env.PGDATABASE ?? 'nestwise_test', { fresh: true })
}
