import { register } from 'tsx/esm/api'
import { ensurePostgres } from '../../scripts/lib/postgres'
import { databasesNamed, dropDatabase, prepareDatabase } from '../../scripts/lib/database'
import { INTEGRATION_DB_PREFIX } from './integration-database'

const isRunning = (pid: number) => {
  try {
    process.kill(pid, 0)
    return true
  } catch (error) {
    return (error as NodeJS.ErrnoException).code === 'EPERM'
  }
}

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
    for (const left of await databasesNamed(INTEGRATION_DB_PREFIX)) {
      // nestwise_test_<pid>, or a database a test file made for itself: nestwise_test_<pid>_<what>.
      const pid = Number(/^\d+/.exec(left.slice(INTEGRATION_DB_PREFIX.length))?.[0])
      if (left !== name && !left.startsWith(`${name}_`) && Number.isInteger(pid) && !isRunning(pid))
        await dropDatabase(left)
    }
    await prepareDatabase(name, { fresh: true })
  } finally {
    await unregister()
  }
  return () => dropDatabase(name)
}
