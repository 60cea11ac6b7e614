import { register } from 'tsx/esm/api'
import { ensurePostgres } from '../../scripts/lib/postgres'
import { dropDatabase, dropOrphanedDatabases, prepareDatabase } from '../../scripts/lib/database'
import { INTEGRATION_DB_PREFIX } from './integration-database'

/**
 * Integration tests run against the real PostgreSQL, in a database of their own run (named in
 * vitest.config.ts after the run's process), migrated fresh and dropped at the end; databases left
 * by runs that were killed are dropped at the next start.
 */
export default async function setup(): Promise<() => Promise<void>> {
  // knex imports the TypeScript migrations with Node's own import(); vitest's runner does not cover that.
  const unregister = register()
  const name = process.env.NESTWISE_TEST_DB
  if (!name?.startsWith(INTEGRATION_DB_PREFIX))
    throw new Error('NESTWISE_TEST_DB names no integration database')
  ensurePostgres()
  try {
    // nestwise_test_<pid>, or a database a test file made for itself: nestwise_test_<pid>_<what>.
    await dropOrphanedDatabases(INTEGRATION_DB_PREFIX, name)
    await prepareDatabase(name, { fresh: true })
  } finally {
    await unregister()
  }
  return () => dropDatabase(name)
}
