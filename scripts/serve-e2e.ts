export {}

// The server Playwright talks to: its own freshly seeded database and port, serving the built client.
process.env.PGDATABASE = process.env.E2E_DATABASE ?? 'nestwise_e2e'
process.env.PORT = process.env.E2E_PORT ?? '3100'
process.env.NODE_ENV = 'test'
process.env.LOGIN_RATE_LIMIT = '1000'

const { ensurePostgres } = await import('./lib/postgres')
const { prepareDatabase } = await import('./lib/database')

ensurePostgres()
await prepareDatabase(process.env.PGDATABASE, { fresh: true, seed: true })
await import('../server/index')
