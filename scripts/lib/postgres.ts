import {
  appendFileSync,
  chmodSync,
  existsSync,
  mkdirSync,
  readdirSync,
  readFileSync,
  rmSync,
  writeFileSync,
} from 'node:fs'
import { dirname, join, resolve } from 'node:path'
import { tmpdir } from 'node:os'
import { aptInstall, capture, run } from './run'
import { freePortSync, portHolder, portTaken } from './ports'
import { config } from '../../server/config'

/** The project's own PostgreSQL cluster: a git-ignored folder, loopback only, a fixed non-default port. */
export const dataRoot = resolve('.data')
export const clusterDir = join(dataRoot, 'pg')

const isRoot = process.getuid?.() === 0

export interface ClusterSettings {
  /** The data folder. */
  dir: string
  /** The port it is meant to run on. */
  port: number
  user: string
  password: string
}

export interface EnsureOptions {
  /**
   * When the port is taken by something else (another checkout's cluster), run on a free port
   * instead and say so; otherwise stop with a message naming what is in the way.
   */
  moveIfTaken?: boolean
}

export interface RunningCluster {
  /** The port it listens on (the configured one unless it had to move). */
  port: number
  /** True when this call started it (so the caller may stop it again). */
  started: boolean
}

function pgBinDir(): string | null {
  const base = '/usr/lib/postgresql'
  if (!existsSync(base)) return null
  const versions = readdirSync(base)
    .filter((v) => existsSync(join(base, v, 'bin', 'initdb')))
    .sort((a, b) => Number(b) - Number(a))
  return versions.length ? join(base, versions[0], 'bin') : null
}

function binDir(): string {
  let bin = pgBinDir()
  if (!bin) {
    aptInstall(['postgresql'])
    bin = pgBinDir()
    if (!bin) throw new Error('PostgreSQL binaries not found after installing the postgresql package')
  }
  return bin
}

// PostgreSQL reads PGPORT, PGDATA and the like as defaults: none of the app's settings may reach it.
const pgEnv = () => Object.fromEntries(Object.entries(process.env).filter(([name]) => !name.startsWith('PG')))

/** initdb, pg_ctl and postgres refuse to run as root, so root runs them as the postgres user. */
function asPostgres(bin: string, args: string[]): void {
  if (isRoot) run('runuser', ['-u', 'postgres', '--', bin, ...args], { cwd: '/', env: pgEnv() })
  else run(bin, args, { env: pgEnv() })
}

/** A cluster in `settings.dir`, created on first use. */
export function localCluster(settings: ClusterSettings) {
  const { dir } = settings

  const isRunning = (bin: string): boolean => {
    const args = ['status', '-D', dir]
    const out = isRoot
      ? capture('runuser', ['-u', 'postgres', '--', join(bin, 'pg_ctl'), ...args], { cwd: '/', env: pgEnv() })
      : capture(join(bin, 'pg_ctl'), args, { env: pgEnv() })
    return out !== null && out.includes('server is running')
  }

  /** The port a running cluster listens on (line 4 of postmaster.pid). */
  const runningPort = (): number | null => {
    try {
      const port = Number(readFileSync(join(dir, 'postmaster.pid'), 'utf8').split('\n')[3])
      return Number.isInteger(port) && port > 0 ? port : null
    } catch {
      return null
    }
  }

  const init = (bin: string): void => {
    console.log(`[setup] creating a PostgreSQL cluster in ${dir}`)
    mkdirSync(dirname(dir), { recursive: true })
    chmodSync(dirname(dir), 0o755)
    mkdirSync(dir, { recursive: true })
    if (isRoot) run('chown', ['postgres:postgres', dir])
    // The password file must live outside the data folder and be readable by the postgres user.
    const pwfile = join(tmpdir(), `nestwise-pw-${process.pid}`)
    writeFileSync(pwfile, `${settings.password}\n`, { mode: 0o644 })
    try {
      asPostgres(join(bin, 'initdb'), [
        '-D',
        dir,
        '-U',
        settings.user,
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
      join(dir, 'postgresql.conf'),
      [
        '',
        '# Nestwise: loopback only, own port, socket inside the data folder',
        "listen_addresses = '127.0.0.1'",
        `port = ${settings.port}`,
        `unix_socket_directories = '${dir}'`,
        'shared_buffers = 256MB',
        'max_wal_size = 2GB',
        '',
      ].join('\n'),
    )
  }

  return {
    /** Installs PostgreSQL when missing, creates the cluster once, and starts it when it is not running. */
    ensure(options: EnsureOptions = {}): RunningCluster {
      const bin = binDir()
      if (!existsSync(join(dir, 'PG_VERSION'))) init(bin)
      if (isRunning(bin)) return { port: runningPort() ?? settings.port, started: false }
      let port = settings.port
      if (portTaken(port)) {
        const holder = portHolder(port) ?? 'another program'
        if (!options.moveIfTaken)
          throw new Error(
            `Port ${port} on 127.0.0.1 is taken by ${holder}, perhaps another checkout's npm start. Stop it, or give this checkout another port (PGPORT=… in .env).`,
          )
        port = freePortSync()
        console.log(
          `[setup] port ${settings.port} is taken by ${holder}; this run's cluster uses port ${port}`,
        )
      }
      asPostgres(join(bin, 'pg_ctl'), [
        '-D',
        dir,
        '-l',
        join(dir, 'server.log'),
        '-o',
        `-p ${port}`,
        '-w',
        '-t',
        '60',
        'start',
      ])
      console.log(`[setup] PostgreSQL listening on 127.0.0.1:${port}`)
      return { port, started: true }
    },

    stop(): void {
      const bin = pgBinDir()
      if (!bin || !existsSync(join(dir, 'PG_VERSION')) || !isRunning(bin)) return
      asPostgres(join(bin, 'pg_ctl'), ['-D', dir, '-m', 'fast', '-w', 'stop'])
    },

    runningPort,
  }
}

const project = localCluster({
  dir: clusterDir,
  port: config.PGPORT,
  user: config.PGUSER,
  password: config.PGPASSWORD,
})

/** The project's cluster (see localCluster.ensure). */
export function ensurePostgres(options: EnsureOptions = {}): RunningCluster {
  return project.ensure(options)
}

export function stopPostgres(): void {
  project.stop()
}
