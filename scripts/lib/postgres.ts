import { existsSync, mkdirSync, readdirSync, writeFileSync, chmodSync, rmSync, appendFileSync } from 'node:fs'
import { join, resolve } from 'node:path'
import { tmpdir } from 'node:os'
import { aptInstall, capture, run } from './run'
import { config } from '../../server/config'

/** The project's own PostgreSQL cluster: a git-ignored folder, loopback only, a fixed non-default port. */
export const dataRoot = resolve('.data')
export const clusterDir = join(dataRoot, 'pg')

const isRoot = process.getuid?.() === 0

function pgBinDir(): string | null {
  const base = '/usr/lib/postgresql'
  if (!existsSync(base)) return null
  const versions = readdirSync(base)
    .filter((v) => existsSync(join(base, v, 'bin', 'initdb')))
    .sort((a, b) => Number(b) - Number(a))
  return versions.length ? join(base, versions[0], 'bin') : null
}

/** initdb, pg_ctl and postgres refuse to run as root, so root runs them as the postgres user. */
function asPostgres(bin: string, args: string[]): void {
  if (isRoot) run('runuser', ['-u', 'postgres', '--', bin, ...args], { cwd: '/' })
  else run(bin, args)
}

function isRunning(bin: string): boolean {
  const args = ['status', '-D', clusterDir]
  const out = isRoot
    ? capture('runuser', ['-u', 'postgres', '--', join(bin, 'pg_ctl'), ...args], { cwd: '/' })
    : capture(join(bin, 'pg_ctl'), args)
  return out !== null && out.includes('server is running')
}

function initCluster(bin: string): void {
  console.log(`[setup] creating a PostgreSQL cluster in ${clusterDir}`)
  mkdirSync(dataRoot, { recursive: true })
  chmodSync(dataRoot, 0o755)
  mkdirSync(clusterDir, { recursive: true })
  if (isRoot) run('chown', ['postgres:postgres', clusterDir])
  // The password file must live outside the data folder and be readable by the postgres user.
  const pwfile = join(tmpdir(), `nestwise-pw-${process.pid}`)
  writeFileSync(pwfile, `${config.PGPASSWORD}\n`, { mode: 0o644 })
  try {
    asPostgres(join(bin, 'initdb'), [
      '-D',
      clusterDir,
      '-U',
      config.PGUSER,
      `--pwfile=${pwfile}`,
      '--no-instructions',
      '--auth-local=scram-sha-256',
      '--auth-host=scram-sha-256',
      '-E',
      'UTF8',
      '--locale=C.UTF-8',
    ])
  } finally {
    rmSync(pwfile, { force: true })
  }
  appendFileSync(
    join(clusterDir, 'postgresql.conf'),
    [
      '',
      '# Nestwise: loopback only, own port, socket inside the data folder',
      "listen_addresses = '127.0.0.1'",
      `port = ${config.PGPORT}`,
      `unix_socket_directories = '${clusterDir}'`,
      'shared_buffers = 256MB',
      'max_wal_size = 2GB',
      '',
    ].join('\n'),
  )
}

/** Installs PostgreSQL when missing, creates the cluster once, and starts it when it is not running. */
export function ensurePostgres(): void {
  let bin = pgBinDir()
  if (!bin) {
    aptInstall(['postgresql'])
    bin = pgBinDir()
    if (!bin) throw new Error('PostgreSQL binaries not found after installing the postgresql package')
  }
  if (!existsSync(join(clusterDir, 'PG_VERSION'))) initCluster(bin)
  if (isRunning(bin)) return
  asPostgres(join(bin, 'pg_ctl'), [
    '-D',
    clusterDir,
    '-l',
    join(clusterDir, 'server.log'),
    '-w',
    '-t',
    '60',
    'start',
  ])
  console.log(`[setup] PostgreSQL listening on ${config.PGHOST}:${config.PGPORT}`)
}

export function stopPostgres(): void {
  const bin = pgBinDir()
  if (!bin || !existsSync(join(clusterDir, 'PG_VERSION')) || !isRunning(bin)) return
  asPostgres(join(bin, 'pg_ctl'), ['-D', clusterDir, '-m', 'fast', '-w', 'stop'])
}
