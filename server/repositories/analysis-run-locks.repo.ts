import pg from 'pg'
import { config } from '../config'
import { logger } from '../logger'
import { RUN_LOCK_NAMESPACE } from './analysis-jobs.repo'

/**
 * Proof that a run's process is alive, kept by PostgreSQL itself: each process running analyses
 * holds one connection of its own on which it takes a session advisory lock per running version.
 * When the process dies, its connection closes and PostgreSQL drops the locks at once, so another
 * process sees the run is orphaned (lockOrphanedRuns) without leases or heartbeats to tune.
 * If this connection itself breaks, every lock it held is gone: `onLost` tells the runner to
 * abandon its runs, which other processes (or this one) then take back.
 */
export class RunLocks {
  private client: Promise<pg.Client> | null = null

  constructor(private readonly onLost: (err: unknown) => void) {}

  private connect(): Promise<pg.Client> {
    this.client ??= (async () => {
      const client = new pg.Client({
        host: config.PGHOST,
        port: config.PGPORT,
        user: config.PGUSER,
        password: config.PGPASSWORD,
        database: config.PGDATABASE,
        // Names the process, so an operator (or a test) can tell whose runs these locks are.
        application_name: `nestwise-run-locks-${process.pid}`,
        keepAlive: true,
      })
      const lost = (err: unknown) => {
        if (this.client === current) this.client = null
        this.onLost(err)
      }
      client.on('error', (err) => lost(err))
      client.on('end', () => lost(new Error('run-lock connection ended')))
      await client.connect()
      return client
    })()
    const current = this.client
    current.catch(() => {
      if (this.client === current) this.client = null
    })
    return current
  }

  /** Takes the run lock of a version; false when another live process holds it. */
  async hold(versionId: number): Promise<boolean> {
    const client = await this.connect()
    const { rows } = await client.query<{ ok: boolean }>(
      'SELECT pg_try_advisory_lock(hashtext($1), $2::int) AS ok',
      [RUN_LOCK_NAMESPACE, versionId],
    )
    return rows[0].ok
  }

  async release(versionId: number): Promise<void> {
    const client = await this.client?.catch(() => null)
    if (!client) return
    await client
      .query('SELECT pg_advisory_unlock(hashtext($1), $2::int)', [RUN_LOCK_NAMESPACE, versionId])
      .catch((err: unknown) => logger.warn('could not release a run lock', { versionId, err }))
  }

  async close(): Promise<void> {
    const pending = this.client
    this.client = null
    const client = await pending?.catch(() => null)
    if (!client) return
    client.removeAllListeners('end')
    client.removeAllListeners('error')
    client.on('error', () => {})
    await client.end().catch(() => {})
  }
}
