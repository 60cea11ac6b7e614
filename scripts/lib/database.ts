import knex, { type Knex } from 'knex'
import knexConfig from '../../knexfile'

function connectTo(database: string): Knex {
  const connection = { ...(knexConfig.connection as Knex.PgConnectionConfig), database }
  return knex({ ...knexConfig, connection, pool: { min: 0, max: 2 } })
}

async function recreate(name: string, fresh: boolean): Promise<void> {
  const admin = connectTo('postgres')
  try {
    const exists = await admin.raw('select 1 from pg_database where datname = ?', [name])
    if (exists.rows.length && fresh) {
      await admin.raw('drop database ?? with (force)', [name])
    }
    if (!exists.rows.length || fresh) await admin.raw('create database ??', [name])
  } finally {
    await admin.destroy()
  }
}

/**
 * Creates the database when missing (or anew when `fresh`), migrates it to the latest schema and,
 * when asked, seeds the demo scenario. Seeds are idempotent, so this is safe on every start.
 */
export async function prepareDatabase(name: string, { fresh = false, seed = false } = {}): Promise<void> {
  await recreate(name, fresh)
  const db = connectTo(name)
  try {
    const [, applied] = await db.migrate.latest()
    if (applied.length) console.log(`[setup] ${name}: applied ${applied.length} migration(s)`)
    if (seed) {
      // The demo's uploads keep their originals like any upload: with ORIGINALS_STORE=s3 and no
      // S3_ENDPOINT, in the local fake, which this process runs while seeding.
      const { startOriginalsRuntime } = await import('../../server/originals')
      const originals = await startOriginalsRuntime()
      try {
        await db.seed.run()
      } finally {
        await originals.stop()
      }
      console.log(`[setup] ${name}: demo scenario seeded`)
    }
  } finally {
    await db.destroy()
  }
}

/** Drops a database if it exists, closing the connections still open on it. */
export async function dropDatabase(name: string): Promise<void> {
  const admin = connectTo('postgres')
  try {
    await admin.raw('drop database if exists ?? with (force)', [name])
  } finally {
    await admin.destroy()
  }
}

/** Names of the databases that start with `prefix`. */
async function databasesNamed(prefix: string): Promise<string[]> {
  const admin = connectTo('postgres')
  try {
    const result = await admin.raw('select datname from pg_database where starts_with(datname, ?)', [prefix])
    return (result.rows as { datname: string }[]).map((r) => r.datname)
  } finally {
    await admin.destroy()
  }
}

const isRunning = (pid: number) => {
  try {
    process.kill(pid, 0)
    return true
  } catch (error) {
    return (error as NodeJS.ErrnoException).code === 'EPERM'
  }
}

/**
 * Drops the databases of earlier runs killed before their teardown: those named `prefix` + the
 * pid of a process no longer running (and anything after it). `current` and its own `current_…`
 * databases are kept.
 */
export async function dropOrphanedDatabases(prefix: string, current: string): Promise<void> {
  for (const name of await databasesNamed(prefix)) {
    const pid = Number(/^\d+/.exec(name.slice(prefix.length))?.[0])
    if (name === current || name.startsWith(`${current}_`)) continue
    if (Number.isInteger(pid) && pid > 0 && !isRunning(pid)) await dropDatabase(name)
  }
}
