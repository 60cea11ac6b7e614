import { spawnSync } from 'node:child_process'
import {
  appendFileSync,
  chmodSync,
  existsSync,
  mkdtempSync,
  readdirSync,
  readFileSync,
  rmSync,
  writeFileSync,
} from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { freePortSync } from '../../scripts/lib/ports'

/**
 * A PostgreSQL cluster of a test's own, on a free port in a temporary folder, that the test may stop
 * and start (the shared cluster other runs use is never touched). It imports nothing of the app, so
 * a test can point the configuration at it before the app loads.
 */
export interface ThrowawayCluster {
  port: number
  stop(): void
  start(): void
  /** Stops the cluster and deletes its folder. */
  destroy(): void
}

const isRoot = process.getuid?.() === 0

function pgBin(): string {
  const base = '/usr/lib/postgresql'
  const versions = existsSync(base)
    ? readdirSync(base)
        .filter((v) => existsSync(join(base, v, 'bin', 'initdb')))
        .sort((a, b) => Number(b) - Number(a))
    : []
  if (!versions.length) throw new Error('PostgreSQL binaries not found under /usr/lib/postgresql')
  return join(base, versions[0], 'bin')
}

/** initdb and pg_ctl refuse root, so root runs them as the postgres user. */
function run(bin: string, args: string[]): void {
  // PostgreSQL reads PGPORT, PGDATA and the like as defaults: none of the app's may reach it.
  const env = Object.fromEntries(Object.entries(process.env).filter(([name]) => !name.startsWith('PG')))
  const result = isRoot
    ? spawnSync('runuser', ['-u', 'postgres', '--', bin, ...args], { cwd: '/', encoding: 'utf8', env })
    : spawnSync(bin, args, { encoding: 'utf8', env })
  if (result.status !== 0)
    throw new Error(`${bin} ${args.join(' ')} failed: ${result.stderr || result.stdout}`)
}

export async function startThrowawayCluster(login: {
  user: string
  password: string
}): Promise<ThrowawayCluster> {
  const bin = pgBin()
  const dir = mkdtempSync(join(tmpdir(), 'nestwise-cluster-'))
  chmodSync(dir, 0o755)
  const data = join(dir, 'pg')
  const pwfile = join(dir, 'pw')
  writeFileSync(pwfile, `${login.password}\n`, { mode: 0o644 })
  if (isRoot) spawnSync('chown', ['-R', 'postgres:postgres', dir])
  const port = freePortSync()
  run(join(bin, 'initdb'), [
    '-D',
    data,
    '-U',
    login.user,
    `--pwfile=${pwfile}`,
    '--no-instructions',
    '--auth-host=scram-sha-256',
    '--auth-local=scram-sha-256',
    '-E',
    'UTF8',
    '--locale=C.UTF-8',
  ])
  appendFileSync(
    join(data, 'postgresql.conf'),
    `\nlisten_addresses = '127.0.0.1'\nport = ${port}\nunix_socket_directories = '${data}'\nfsync = off\nshared_buffers = 32MB\n`,
  )
  const pgCtl = join(bin, 'pg_ctl')
  let running = false
  const cluster: ThrowawayCluster = {
    port,
    start() {
      try {
        run(pgCtl, ['-D', data, '-l', join(dir, 'server.log'), '-w', '-t', '60', 'start'])
      } catch (error) {
        const log = existsSync(join(dir, 'server.log')) ? readFileSync(join(dir, 'server.log'), 'utf8') : ''
        throw new Error(`${(error as Error).message}\n${log.split('\n').slice(-15).join('\n')}`)
      }
      running = true
    },
    stop() {
      if (!running) return
      run(pgCtl, ['-D', data, '-m', 'fast', '-w', 'stop'])
      running = false
    },
    destroy() {
      try {
        cluster.stop()
      } finally {
        rmSync(dir, { recursive: true, force: true })
      }
    },
  }
  cluster.start()
  return cluster
}
