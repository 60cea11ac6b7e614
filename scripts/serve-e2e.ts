export {}

// The server Playwright talks to: its own freshly seeded database and port, serving the built client.
// playwright.config.ts chooses both for the run (E2E_DATABASE, E2E_PORT) and drops the database after.
const E2E_PREFIX = 'nestwise_e2e_'
process.env.PGDATABASE = process.env.E2E_DATABASE ?? `${E2E_PREFIX}${process.ppid}`
if (!process.env.E2E_PORT)
  throw new Error('E2E_PORT is not set: start the browser tests with npx playwright test')
process.env.PORT = process.env.E2E_PORT
process.env.NODE_ENV = 'test'
process.env.LOGIN_RATE_LIMIT = '1000'

const { ensurePostgres } = await import('./lib/postgres')
const { dropOrphanedDatabases, prepareDatabase } = await import('./lib/database')

ensurePostgres()
// Databases of earlier runs that were killed before their teardown (named after their runner's pid).
await dropOrphanedDatabases(E2E_PREFIX, process.env.PGDATABASE)
await prepareDatabase(process.env.PGDATABASE, { fresh: true, seed: true })
await import('../server/index')
